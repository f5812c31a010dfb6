/**
 * `bellwether estimate FILE [--outliers none|dixon|tukey|horn] [--screening apply|propose]
 *   [--transform auto|none|ln|box-cox] [--seed N]`
 * Reads a CSV with a header row and a `value` column (other columns are ignored) and prints
 * the estimate document as JSON, stamped with the engine's version and commit. The command
 * line applies the outlier screen by default (its proposals are excluded, and the document's
 * `screening.applied` says so); `--screening propose` only lists them, as the app does.
 */
import { readFile } from "node:fs/promises";
import {
  estimateReferenceInterval,
  OUTLIER_OPTIONS,
  SCREENING_MODES,
  TRANSFORM_OPTIONS,
  DEFAULT_SEED,
  type EngineIdentity,
  type OutlierOption,
  type ScreeningMode,
  type TransformOption,
} from "../../lib/stats/estimate";
import { engineIdentity, stampEngine } from "../../lib/engine";
import { StatsInputError } from "../../lib/stats/validate";
import { CliError } from "./cli-error";
import { readValues } from "./read-values";

export { readValues };

interface Parsed {
  file: string;
  outliers: OutlierOption;
  screening: ScreeningMode;
  transform: TransformOption;
  seed: number;
}

function parseArgs(args: string[]): Parsed {
  let file: string | null = null;
  let outliers: OutlierOption = "horn";
  let screening: ScreeningMode = "apply";
  let transform: TransformOption = "auto";
  let seed = DEFAULT_SEED;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const eq = a.startsWith("--") ? a.indexOf("=") : -1;
    const flag = eq > 0 ? a.slice(0, eq) : a;
    const inline = eq > 0 ? a.slice(eq + 1) : undefined;
    const value = () => {
      const v = inline ?? args[++i];
      if (v === undefined) throw new CliError(`${flag} needs a value`);
      return v;
    };
    if (flag === "--outliers") {
      const v = value();
      if (!(OUTLIER_OPTIONS as readonly string[]).includes(v)) {
        throw new CliError(`--outliers must be one of ${OUTLIER_OPTIONS.join(", ")} (got "${v}")`);
      }
      outliers = v as OutlierOption;
    } else if (flag === "--screening") {
      const v = value();
      if (!(SCREENING_MODES as readonly string[]).includes(v)) {
        throw new CliError(`--screening must be one of ${SCREENING_MODES.join(", ")} (got "${v}")`);
      }
      screening = v as ScreeningMode;
    } else if (flag === "--transform") {
      const v = value();
      if (!(TRANSFORM_OPTIONS as readonly string[]).includes(v)) {
        throw new CliError(`--transform must be one of ${TRANSFORM_OPTIONS.join(", ")} (got "${v}")`);
      }
      transform = v as TransformOption;
    } else if (flag === "--seed") {
      const v = value();
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
  if (file === null) throw new CliError("estimate needs a CSV FILE with a value column");
  return { file, outliers, screening, transform, seed };
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
  const values = readValues(text, opts.file);
  const engine = readEngine();
  let doc;
  try {
    doc = estimateReferenceInterval(values, {
      outliers: opts.outliers,
      screening: opts.screening,
      transform: opts.transform,
      seed: opts.seed,
    });
  } catch (e) {
    if (e instanceof StatsInputError) throw new CliError(e.message);
    throw e;
  }
  process.stdout.write(`${JSON.stringify(stampEngine(doc, engine), null, 2)}\n`);
  return 0;
}

/** The engine's identity; a malformed BELLWETHER_COMMIT is the caller's error, not a crash. */
function readEngine(): EngineIdentity {
  try {
    return engineIdentity();
  } catch (e) {
    const problems = String((e as Error).message).split("\n").slice(1).map((l) => l.replace(/^\s*-\s*/, ""));
    throw new CliError(`the environment is not valid: ${problems.join("; ")}`);
  }
}
