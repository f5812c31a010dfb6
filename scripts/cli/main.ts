/**
 * The command line's dispatcher and its one error policy:
 *  - a usage or input error (CliError) prints one line to stderr and exits 2;
 *  - anything else is a crash: one line saying it is a bug in Bellwether, not a usage error,
 *    the stack only with --debug, exit code 1.
 */
import { CliError } from "./cli-error";

export const USAGE = `usage:
  bellwether estimate FILE [--outliers none|dixon|tukey|horn] [--screening apply|propose] [--transform auto|none|ln|box-cox] [--seed N] [--debug]
  bellwether score --model MODEL.json VALUE... [--debug]
  bellwether lms FILE --at AGES [--seed N] [--debug]
  bellwether indirect FILE [--seed N] [--debug]
  bellwether verify-audit [--head POSITION:HASH] [--debug]`;

export type Command = (args: string[]) => Promise<number>;

/** The commands, loaded on demand so that `score` does not pay for the estimate's imports. */
export const COMMANDS: Readonly<Record<string, () => Promise<Command>>> = {
  estimate: async () => (await import("./estimate")).run,
  score: async () => (await import("./score")).run,
  lms: async () => (await import("./lms")).run,
  indirect: async () => (await import("./indirect")).run,
  "verify-audit": async () => (await import("./verify-audit")).run,
};

export interface CliIo {
  writeErr: (text: string) => void;
}

const processIo: CliIo = { writeErr: (text) => process.stderr.write(text) };

function firstLine(text: string): string {
  return text.split("\n")[0];
}

/**
 * Reports an error that is not a usage error: one line, and the stack after it with --debug.
 * Returns the exit code, 1.
 */
export function reportCrash(err: unknown, debug: boolean, io: CliIo = processIo): number {
  const what = err instanceof Error ? `${err.name}: ${firstLine(err.message)}` : firstLine(String(err));
  io.writeErr(
    `bellwether: internal error (${what}). This is a bug in Bellwether, not a usage error; ` +
      `please report it with the command that caused it${debug ? "." : " (--debug prints the stack)."}\n`,
  );
  if (debug) io.writeErr(`${err instanceof Error && err.stack ? err.stack : String(err)}\n`);
  return 1;
}

/**
 * Runs one command line (without the program name) and returns its exit code: 0 on success,
 * 2 for a usage or input error, 1 for a crash. `--debug` anywhere asks for the stack of a crash.
 */
export async function runCli(
  argv: readonly string[],
  commands: Readonly<Record<string, () => Promise<Command>>> = COMMANDS,
  io: CliIo = processIo,
): Promise<number> {
  const debug = argv.includes("--debug");
  const args = argv.filter((a) => a !== "--debug");
  try {
    const [command, ...rest] = args;
    if (command === undefined) throw new CliError(USAGE);
    if (!Object.hasOwn(commands, command)) throw new CliError(`unknown command "${command}"\n${USAGE}`);
    const run = await commands[command]();
    return await run(rest);
  } catch (err) {
    if (err instanceof CliError) {
      io.writeErr(`bellwether: ${firstLine(err.message)}\n`);
      return 2;
    }
    return reportCrash(err, debug, io);
  }
}
