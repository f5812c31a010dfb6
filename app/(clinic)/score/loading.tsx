// While the catalogue loads: the form's shape in grey, so nothing jumps when it arrives.
export default function Loading() {
  return (
    <div aria-busy="true" aria-label="Loading the score page" className="animate-pulse space-y-4">
      <div className="h-7 w-56 rounded bg-ink-200" />
      <div className="h-4 w-2/3 rounded bg-ink-100" />
      <div className="space-y-3 rounded-lg border border-ink-200 bg-white p-4">
        <div className="h-7 w-64 rounded bg-ink-100" />
        <div className="grid gap-3 sm:grid-cols-4">
          {Array.from({ length: 4 }, (_, i) => (
            <div key={i} className="h-12 rounded bg-ink-100" />
          ))}
        </div>
        <div className="grid gap-3 sm:grid-cols-3">
          {Array.from({ length: 3 }, (_, i) => (
            <div key={i} className="h-12 rounded bg-ink-100" />
          ))}
        </div>
      </div>
      <div className="h-40 rounded-lg border border-dashed border-ink-300 bg-white" />
    </div>
  );
}
