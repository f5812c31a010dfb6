/**
 * `bellwether lms FILE --at AGES [--seed N]`
 * Reads a CSV with `age_years` and `value` columns (one row per donor; other columns ignored),
 * fits LMS centile curves in age (lib/stats/lms-curves.ts) and prints one JSON document:
 *   {n, at, lower, median, upper, L, M, S, edf, warnings}
 * `at` echoes the requested ages (comma-separated in the option); lower, median, upper, L, M
 * and S hold the value at each of them (lower/upper: the 2.5th/97.5th centiles, null where the
 * centile does not exist); edf is {L, M, S}, the effective degrees of freedom of each curve.
 */
import { readFile } from "node:fs/promises";
import { estimateLmsCurves } from "../../lib/stats/lms-curves";
import { LMS_DEFAULT_SEED } from "../../lib/stats/lms-fit";
import { StatsInputError } from "../../lib/stats/validate";
import { CliError } from "./cli-error";
import { readAgeValues } from "./read-age-values";

const USAGE = "usage: bellwether lms FILE --at AGES [--seed N]";
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

interface Parsed {
  file: string;
  at: number[];
  seed: number;
}

function parseAges(raw: string): number[] {
  const parts = raw.split(",").map((p) => p.trim());
  if (parts.length === 0 || parts.every((p) => p === "")) throw new CliError("--at needs at least one age in years");
  return parts.map((p) => {
    if (!NUMBER.test(p)) throw new CliError(`--at: "${p}" is not an age in years`);
    const v = Number(p);
    if (v < 0) throw new CliError(`--at: age ${p} is negative`);
    return v;
  });
}

function parseArgs(args: string[]): Parsed {
  let file: string | null = null;
  let at: number[] | null = null;
  let seed = LMS_DEFAULT_SEED;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const eq = a.startsWith("--") ? a.indexOf("=") : -1;
    const flag = eq > 0 ? a.slice(0, eq) : a;
    const inline = eq > 0 ? a.slice(eq + 1) : undefined;
    const value = () => {
      const v = inline ?? args[++i];
      if (v === undefined) throw new CliError(`${flag} needs a value\n${USAGE}`);
      return v;
    };
    if (flag === "--at") {
      at = parseAges(value());
    } else if (flag === "--seed") {
      const v = value();
      if (!/^-?\d+$/.test(v) || !Number.isSafeInteger(Number(v))) {
        throw new CliError(`--seed must be an integer (got "${v}")`);
      }
      seed = Number(v);
    } else if (flag.startsWith("--")) {
      throw new CliError(`unknown option ${flag}\n${USAGE}`);
    } else if (file === null) {
      file = a;
    } else {
      throw new CliError(`only one FILE may be given (got "${file}" and "${a}")`);
    }
  }
  if (file === null) throw new CliError(`lms needs a CSV FILE with age_years and value columns\n${USAGE}`);
  if (at === null) throw new CliError(`--at is required: the ages in years at which to read the curves\n${USAGE}`);
  return { file, at, seed };
}

export async function run(args: string[]): Promise<number> {
  const opts = parseArgs(args);
  let text: string;
  try {
    text = await readFile(opts.file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(
      code === "ENOENT" ? `${opts.file}: no such file` : `${opts.file}: cannot read (${code ?? String(e)})`,
    );
  }
  const { ages, values } = readAgeValues(text, opts.file);
  let document;
  try {
    document = estimateLmsCurves(ages, values, { at: opts.at, seed: opts.seed }).document;
  } catch (e) {
    if (e instanceof StatsInputError) throw new CliError(`${opts.file}: ${e.message}`);
    throw e;
  }
  process.stdout.write(`${JSON.stringify(document, null, 2)}\n`);
  return 0;
}
