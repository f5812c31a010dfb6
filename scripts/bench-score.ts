/**
 * Time scoring 10⁶ values against one gaussian (Box-Cox) model and one empirical model
 * (1000 reference values), through scoreMany, the batch path. Target: under 200 ms each.
 * Run: npx tsx scripts/bench-score.ts
 */
import { scoringPartitionSchema } from "../lib/scoring/model";
import { scoreMany } from "../lib/scoring/score";

const COUNT = 1_000_000;

// A fixed, shuffled spread of values over 2.5–6, i.e. z from about −4 to +3.6 under the
// gaussian model below: patient values near and beyond the interval, as an LIS sends them.
// (Far-tail values, |z| > 5, take about twice as long in Φ's erfc branch.)
const values = new Float64Array(COUNT);
for (let i = 0; i < COUNT; i++) values[i] = 2.5 + (3.5 * ((i * 7919) % COUNT)) / COUNT;

const reference = Array.from({ length: 1000 }, (_, i) => 3 + 2.5 * Math.sin((Math.PI * (i + 0.5)) / 2000) ** 2).sort(
  (a, b) => a - b,
);
const partitions = {
  "gaussian (box-cox)": scoringPartitionSchema.parse({
    low: 3.5,
    high: 5.1,
    unit: "mmol/L",
    model: { kind: "gaussian", transform: "box-cox", lambda: 0.4, mean: 1.9, sd: 0.2 },
  }),
  "empirical (n = 1000)": scoringPartitionSchema.parse({
    low: 3.5,
    high: 5.1,
    unit: "mmol/L",
    model: { kind: "empirical", values: reference },
  }),
};

for (const [name, partition] of Object.entries(partitions)) {
  scoreMany(partition, values.subarray(0, 200_000)); // warm-up, so the timing sees optimised code
  const runs: number[] = [];
  for (let r = 0; r < 3; r++) {
    const t0 = process.hrtime.bigint();
    const out = scoreMany(partition, values);
    const ms = Number(process.hrtime.bigint() - t0) / 1e6;
    if (out.invalid.length > 0) throw new Error(`${out.invalid.length} values could not be scored`);
    runs.push(ms);
  }
  const best = Math.min(...runs);
  console.log(
    `${name}: ${COUNT.toLocaleString("en")} values, best of 3 ${best.toFixed(1)} ms ` +
      `(runs ${runs.map((v) => v.toFixed(1)).join(", ")} ms; target < 200 ms)`,
  );
}
