/**
 * Times a full estimate (Horn outliers, automatic scale, every method) against a bare sort of
 * the same values, at n = 120 … 10⁶. Run: npx tsx scripts/bench-estimate.ts
 * "sort" is the engine's numeric sort of a Float64Array copy, the fastest sort of doubles in
 * the runtime and the one the estimate itself uses; the ratio is taken against it. The
 * comparator sort of a plain array copy, `[...x].sort((a, b) => a - b)`, is printed beside it.
 * The screen only proposes, as the app calls it: with screening "apply" the n = 120 sample
 * loses values to the screen and pays for two bootstraps (≈ 40 ms instead of ≈ 1 ms).
 */
import { estimateReferenceInterval } from "../lib/stats/estimate";
import { createRandom } from "../lib/stats/random";
import normal from "@stdlib/stats-base-dists-normal";

/** Lognormal-ish healthy values (ALT-like, U/L) from a seeded generator via Φ⁻¹. */
function sample(n: number, seed: number): number[] {
  const rng = createRandom(seed);
  const x = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const u = (rng.nextUint32() + 0.5) / 0x100000000;
    x[i] = Math.round(Math.exp(Math.log(25) + 0.4 * normal.quantile(u, 0, 1)) * 10) / 10;
  }
  return x;
}

function time(f: () => void, repeat: number): number {
  let best = Infinity;
  for (let r = 0; r < repeat; r++) {
    const t0 = performance.now();
    f();
    best = Math.min(best, performance.now() - t0);
  }
  return best;
}

const sizes = [120, 1_000, 10_000, 100_000, 1_000_000];
console.log("n          estimate ms   sort ms   ratio   array sort ms   estimate ms / (n log2 n) × 1e6");
for (const n of sizes) {
  const x = sample(n, 2024);
  const repeat = n <= 10_000 ? 5 : 2;
  const tEstimate = time(() => estimateReferenceInterval(x, { seed: 1, screening: "propose" }), repeat);
  const tSort = time(() => Float64Array.from(x).sort(), repeat);
  const tArraySort = time(() => [...x].sort((a, b) => a - b), repeat);
  const perNLogN = (tEstimate / (n * Math.log2(n))) * 1e6;
  console.log(
    `${String(n).padEnd(10)} ${tEstimate.toFixed(1).padStart(11)} ${tSort.toFixed(1).padStart(9)} ` +
      `${(tEstimate / tSort).toFixed(1).padStart(7)} ${tArraySort.toFixed(1).padStart(15)}   ` +
      `${perNLogN.toFixed(2)}`,
  );
}
