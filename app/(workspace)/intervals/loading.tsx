// While the register loads: its shape in grey, so nothing jumps when the rows arrive.
export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading the intervals register" className="animate-pulse space-y-4">
      <div className="h-7 w-40 rounded bg-ink-200" />
      <div className="h-4 w-2/3 rounded bg-ink-100" />
      <div className="space-y-2 rounded-lg border border-ink-200 bg-white p-4">
        {Array.from({ length: 9 }, (_, i) => (
          <div key={i} className="h-8 rounded bg-ink-100" />
        ))}
      </div>
    </div>
  );
}
