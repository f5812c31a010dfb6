/**
 * Times the indirect reference interval (truncated maximum likelihood, its bootstrap CIs and
 * Bhattacharya's second opinion) on the committed simulated mixtures, from 5,000 to 100,000
 * values (tests/fixtures/indirect/, made by scripts/fixtures/indirect-mixtures.R), and prints
 * the phases apart: binning, the interval search, the bootstrap. Prints figures, asserts
 * nothing. Run: npm run bench:indirect (the target: 100,000 values in under 5 s on one
 * core). Each run is timed once after one warm-up run of the smallest file.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { indirectReferenceInterval } from "../lib/stats/indirect";
import { indirectCells, type RoutineValue } from "../lib/stats/indirect-cells";
import { truncatedMaximumLikelihood } from "../lib/stats/tml";

interface Mixture {
  name: string;
  file: string;
  n: number;
  trueLower: number;
  trueUpper: number;
}

const ROOT = path.resolve(__dirname, "..");
const mixtures: Mixture[] = JSON.parse(readFileSync(path.join(ROOT, "tests/fixtures/indirect-mixtures.json"), "utf8"));

function read(m: Mixture): RoutineValue[] {
  return readFileSync(path.join(ROOT, m.file), "utf8")
    .trim()
    .split("\n")
    .slice(1)
    .map((t) => (t.startsWith("<") ? { value: Number(t.slice(1)), side: "below" as const } : Number(t)));
}

function ms(f: () => void): number {
  const t0 = performance.now();
  f();
  return performance.now() - t0;
}

indirectReferenceInterval(read(mixtures[0]), { replicates: 100 });
console.log("mixture                      n        cells ms   search ms   total ms   replicates   lower err   upper err   (of the true width)");
for (const m of mixtures) {
  const values = read(m);
  const tCells = ms(() => indirectCells(values));
  const cells = indirectCells(values);
  const tSearch = ms(() => truncatedMaximumLikelihood(cells));
  let doc: ReturnType<typeof indirectReferenceInterval> | null = null;
  const tTotal = ms(() => {
    doc = indirectReferenceInterval(values, { seed: 1 });
  });
  const d = doc as unknown as ReturnType<typeof indirectReferenceInterval>;
  const width = m.trueUpper - m.trueLower;
  console.log(
    [
      m.name.padEnd(28),
      String(m.n).padStart(7),
      tCells.toFixed(0).padStart(10),
      tSearch.toFixed(0).padStart(11),
      tTotal.toFixed(0).padStart(10),
      String(d.bootstrap.replicates).padStart(12),
      (((d.lower as number) - m.trueLower) / width).toFixed(3).padStart(11),
      (((d.upper as number) - m.trueUpper) / width).toFixed(3).padStart(11),
    ].join(" "),
  );
}
