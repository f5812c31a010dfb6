/**
 * Bellwether's command line for batch work by laboratory informaticians.
 *   npm run -s bellwether -- estimate FILE [--outliers …] [--screening …] [--transform …] [--seed N]
 *   npm run -s bellwether -- score --model MODEL.json VALUE…
 *   npm run -s bellwether -- lms FILE --at AGES [--seed N]
 * Each command prints one result to stdout. Bad input prints one line to stderr and exits 2; a
 * crash says it is a bug in Bellwether (the stack with --debug) and exits 1.
 */
import { reportCrash, runCli } from "./cli/main";

const argv = process.argv.slice(2);
const debug = argv.includes("--debug");

// Errors raised outside the command's promise (a stray callback) are crashes too.
process.on("uncaughtException", (err) => {
  process.exit(reportCrash(err, debug));
});

runCli(argv).then(
  (code) => {
    process.exitCode = code;
  },
  (err: unknown) => {
    process.exitCode = reportCrash(err, debug);
  },
);
