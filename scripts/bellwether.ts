/**
 * Bellwether's command line for batch work by laboratory informaticians.
 *   npm run -s bellwether -- estimate FILE [--outliers …] [--transform …] [--seed N]
 *   npm run -s bellwether -- score --model MODEL.json VALUE…
 * Each command prints one result to stdout; bad input prints one line to stderr and exits 2.
 */
import { CliError } from "./cli/cli-error";

const USAGE = `usage:
  bellwether estimate FILE [--outliers none|dixon|tukey|horn] [--transform auto|none|ln|box-cox] [--seed N]
  bellwether score --model MODEL.json VALUE...`;

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  switch (command) {
    case "estimate":
      return (await import("./cli/estimate")).run(rest);
    case "score":
      return (await import("./cli/score")).run(rest);
    default:
      throw new CliError(command ? `unknown command "${command}"\n${USAGE}` : USAGE);
  }
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    const message = err instanceof Error ? err.message : String(err);
    process.stderr.write(`bellwether: ${message.split("\n")[0]}\n`);
    process.exitCode = 2;
  },
);
