/**
 * `bellwether score --model MODEL.json VALUE…`: score values against one partition.
 *
 * MODEL.json is one partition as lib/scoring/model.ts defines it (scoringPartitionSchema):
 *   {
 *     "low": 3.5, "high": 5.1,            inclusive limits; either may be null (one-sided)
 *     "unit": "mmol/L", "decimals": 1,     UCUM unit; decimals for OBX-7 (default 1)
 *     "criticalLow": 2.5, "criticalHigh": 6.5,   optional, configured by the laboratory
 *     "n": 120,                            optional, reference values behind the model
 *     "model": { "kind": "gaussian", "transform": "none" | "ln" | "box-cox", "lambda": -0.3,
 *                "mean": 4.3, "sd": 0.4 }               (mean and sd on the transformed scale)
 *           or { "kind": "empirical", "values": [sorted reference values] }
 *   }
 * A VALUE may carry "<" or ">" for a result outside the measuring range (quote it in the shell).
 * Prints one JSON document: the interval and, per value, z, percentile, its bound, the flag and
 * the caution codes. Bad input: one line on stderr, exit code 2.
 */
import { readFile } from "node:fs/promises";
import { scoringPartitionSchema, type ScoringPartition } from "../../lib/scoring/model";
import { obx7 } from "../../lib/scoring/hl7";
import { createScorer, scoreValue } from "../../lib/scoring/score";
import { StatsInputError } from "../../lib/stats/validate";
import { CliError } from "./cli-error";

const USAGE = "usage: bellwether score --model MODEL.json VALUE...";
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

async function loadPartition(path: string): Promise<ScoringPartition> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (err) {
    throw new CliError(`cannot read model file ${path}: ${(err as NodeJS.ErrnoException).code ?? String(err)}`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (err) {
    throw new CliError(`model file ${path} is not valid JSON: ${(err as Error).message}`);
  }
  const parsed = scoringPartitionSchema.safeParse(json);
  if (!parsed.success) {
    const detail = parsed.error.issues
      .map((i) => (i.path.length ? `${i.path.join(".")}: ${i.message}` : i.message))
      .join("; ");
    throw new CliError(`model file ${path} is not a valid partition: ${detail}`);
  }
  return parsed.data;
}

function parseValue(arg: string): { value: number; censored: "<" | ">" | null } {
  const censored = arg.startsWith("<") ? "<" : arg.startsWith(">") ? ">" : null;
  const body = censored ? arg.slice(1).trim() : arg.trim();
  if (!NUMBER.test(body)) throw new CliError(`"${arg}" is not a number`);
  return { value: Number(body), censored };
}

export async function run(args: string[]): Promise<number> {
  let modelPath: string | null = null;
  const rawValues: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === "--model") {
      if (i + 1 >= args.length) throw new CliError(`--model needs a file name\n${USAGE}`);
      modelPath = args[++i];
    } else if (a.startsWith("--")) {
      throw new CliError(`unknown option ${a}\n${USAGE}`);
    } else {
      rawValues.push(a);
    }
  }
  if (modelPath === null) throw new CliError(`--model is required\n${USAGE}`);
  if (rawValues.length === 0) throw new CliError(`give at least one value to score\n${USAGE}`);

  const partition = await loadPartition(modelPath);
  if (partition.model.kind === "lms") {
    throw new CliError(`model file ${modelPath} holds LMS age curves, which score at an exact age: score them with the API (POST /api/v1/scores with ageYears, or birthDate and collectedAt)`);
  }
  const values = rawValues.map(parseValue);
  // A limits-only model gives a flag and no z: scoreValue handles it without a scorer.
  const scorer = partition.model.kind === "limits" ? undefined : createScorer(partition);
  const scores = values.map(({ value, censored }, i) => {
    try {
      const s = scoreValue({ partition, value, censored }, scorer);
      return {
        value,
        censored,
        z: s.z,
        percentile: s.percentile,
        percentileBound: s.percentileBound,
        flag: s.flag,
        cautions: s.cautions.map((c) => c.code),
      };
    } catch (err) {
      if (err instanceof StatsInputError) throw new CliError(`value "${rawValues[i]}": ${err.message}`);
      throw err;
    }
  });
  const output = {
    unit: partition.unit,
    interval: { low: partition.low, high: partition.high, obx7: obx7(partition.low, partition.high, partition.decimals) },
    model:
      partition.model.kind === "gaussian"
        ? { kind: "gaussian", transform: partition.model.transform }
        : partition.model.kind === "empirical"
          ? { kind: "empirical", n: partition.model.values.length }
          : partition.model,
    scores,
  };
  process.stdout.write(`${JSON.stringify(output, null, 2)}\n`);
  return 0;
}
