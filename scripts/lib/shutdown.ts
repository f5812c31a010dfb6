/**
 * One way out for a long-running command: `stop` runs exactly once, whichever comes first of
 * SIGINT (Ctrl-C reaches every process of the foreground group, in no fixed order), SIGTERM,
 * SIGHUP (the terminal was closed), an uncaught error, or a call to the returned `exit`; then the
 * process exits. Later signals and calls wait for the same stop.
 */

const SIGNALS = ["SIGINT", "SIGTERM", "SIGHUP"] as const;
type Signal = (typeof SIGNALS)[number];

/** Writes a line, ignoring a terminal that is no longer there. */
export function say(line: string, stream: NodeJS.WriteStream = process.stdout): void {
  try {
    stream.write(`${line}\n`);
  } catch {
    // the terminal is gone; stopping goes on regardless
  }
}

export function onShutdown(
  stop: (reason: string) => Promise<void>,
  { signalExitCode }: { signalExitCode: (signal: Signal) => number },
): (code: number, reason: string) => Promise<never> {
  let exiting: Promise<never> | null = null;
  const exit = (code: number, reason: string): Promise<never> => {
    exiting ??= (async () => {
      let exitCode = code;
      try {
        await stop(reason);
      } catch (err) {
        say(`bellwether: while stopping: ${err instanceof Error ? err.message : String(err)}`, process.stderr);
        exitCode = exitCode || 1;
      }
      process.exit(exitCode);
    })();
    return exiting;
  };
  // After the terminal closes, writing to it fails with EIO or EPIPE, emitted as an error event.
  process.stdout.on("error", () => undefined);
  process.stderr.on("error", () => undefined);
  for (const signal of SIGNALS) process.on(signal, () => void exit(signalExitCode(signal), signal));
  process.on("uncaughtException", (err) => {
    say(`bellwether: ${err.stack ?? err.message}`, process.stderr);
    void exit(1, "uncaught error");
  });
  process.on("unhandledRejection", (err) => {
    say(`bellwether: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`, process.stderr);
    void exit(1, "unhandled rejection");
  });
  return exit;
}
