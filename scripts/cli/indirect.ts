/**
 * `bellwether indirect FILE [--seed N]`
 * Reads a CSV of routine results with a `value` column (numbers, or censored values such as
 * "<0.5") and prints the indirect reference interval by truncated maximum likelihood as one
 * JSON document: {n, lower, upper, lowerCi, upperCi, lambda, mu, sigma, fraction,
 * truncation: [a, b], chiSquare, secondOpinion: {method: "bhattacharya", lower, upper}, warnings}.
 */
import { readFile } from "node:fs/promises";
import { indirectReferenceInterval, INDIRECT_DEFAULT_SEED } from "../../lib/stats/indirect";
import { StatsInputError } from "../../lib/stats/validate";
import { CliError } from "./cli-error";
import { readRoutineValues } from "./read-routine-values";

function parseArgs(args: string[]): { file: string; seed: number } {
  let file: string | null = null;
  let seed = INDIRECT_DEFAULT_SEED;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const eq = a.startsWith("--") ? a.indexOf("=") : -1;
    const flag = eq > 0 ? a.slice(0, eq) : a;
    if (flag === "--seed") {
      const v = eq > 0 ? a.slice(eq + 1) : args[++i];
      if (v === undefined) throw new CliError("--seed needs a value");
      if (!/^-?\d+$/.test(v) || !Number.isSafeInteger(Number(v))) {
        throw new CliError(`--seed must be an integer (got "${v}")`);
      }
      seed = Number(v);
    } else if (flag.startsWith("--")) {
      throw new CliError(`unknown option ${flag}`);
    } else if (file === null) {
      file = a;
    } else {
      throw new CliError(`only one FILE may be given (got "${file}" and "${a}")`);
    }
  }
  if (file === null) throw new CliError("indirect needs a CSV FILE with a value column");
  return { file, seed };
}

export async function run(args: string[]): Promise<number> {
  const { file, seed } = parseArgs(args);
  let text: string;
  try {
    text = await readFile(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(code === "ENOENT" ? `${file}: no such file` : `${file}: cannot read (${code ?? String(e)})`);
  }
  const values = readRoutineValues(text, file);
  let r;
  try {
    r = indirectReferenceInterval(values, { seed });
  } catch (e) {
    if (e instanceof StatsInputError) throw new CliError(`${file}: ${e.message}`);
    throw e;
  }
  const doc = {
    n: r.n,
    lower: r.lower,
    upper: r.upper,
    lowerCi: r.lowerCi,
    upperCi: r.upperCi,
    lambda: r.lambda,
    mu: r.mu,
    sigma: r.sigma,
    fraction: r.fraction,
    truncation: r.truncation,
    chiSquare: r.chiSquare,
    secondOpinion: r.secondOpinion,
    warnings: r.warnings,
  };
  process.stdout.write(`${JSON.stringify(doc, null, 2)}\n`);
  return 0;
}
