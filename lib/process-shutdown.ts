/**
 * Work that must finish before the server process exits (the score log's last entries): the
 * parts of the app register it here, and scripts/serve.ts runs it on SIGTERM/SIGINT before it
 * exits. The registry lives on globalThis because Next bundles instrumentation, each route and
 * the custom server separately in one process.
 */
type Task = () => Promise<void>;

const KEY = Symbol.for("bellwether.processShutdown");

function tasks(): Set<Task> {
  const g = globalThis as unknown as Record<symbol, Set<Task> | undefined>;
  g[KEY] ??= new Set();
  return g[KEY];
}

/** Registers `task` to run at shutdown; returns a function that unregisters it. */
export function onProcessShutdown(task: Task): () => void {
  tasks().add(task);
  return () => tasks().delete(task);
}

/** Runs every registered task at once and waits for them, at most `timeoutMs`. Never throws. */
export async function runProcessShutdown(timeoutMs: number): Promise<void> {
  const running = [...tasks()].map((t) =>
    t().catch((err: unknown) => console.error("bellwether: a shutdown task failed", err)),
  );
  let timer: NodeJS.Timeout | undefined;
  const deadline = new Promise<void>((resolve) => {
    timer = setTimeout(resolve, timeoutMs);
  });
  await Promise.race([Promise.all(running), deadline]);
  clearTimeout(timer);
}
