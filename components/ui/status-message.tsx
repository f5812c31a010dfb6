/** The outcome of a form action, announced to screen readers. */
export function StatusMessage({ state }: { state: { status: string; message?: string } }) {
  if (state.status === "idle" || !state.message) return null;
  const ok = state.status === "ok";
  return (
    <p
      role={ok ? "status" : "alert"}
      className={`break-words rounded-md px-3 py-2 text-sm ${ok ? "bg-tide-50 text-tide-700" : "bg-red-50 text-signal-high"}`}
    >
      {state.message}
    </p>
  );
}
