/**
 * Times the LMS fit (lib/stats/lms-fit.ts) on 1,000 to 30,000 seeded paediatric donors drawn
 * from the same smooth L, M and S curves as scripts/fixtures/lms-curves.R (ages uniform from
 * birth to 18 years). Prints figures and asserts nothing; the target is 10,000 donors
 * in under 5 s on one core. Run: npm run bench:lms
 */
import normal from "@stdlib/stats-base-dists-normal";
import { fitLms } from "../lib/stats/lms-fit";
import { lmsValueAtZ } from "../lib/stats/lms-z";
import { createRandom } from "../lib/stats/random";

const L = (a: number) => 0.4 - (0.2 * a) / 18;
const M = (a: number) => 170 + 130 * Math.exp(-a / 1.5) + 80 * Math.exp(-(((a - 12.5) / 3) ** 2));
const S = (a: number) => 0.21 + (0.02 * a) / 18;

function donors(n: number, seed: number): { ages: number[]; values: number[] } {
  const rng = createRandom(seed);
  const ages: number[] = [];
  const values: number[] = [];
  for (let i = 0; i < n; i++) {
    const age = Math.round(rng.nextFloat() * 18 * 1000) / 1000;
    const z = normal.quantile((rng.nextUint32() + 0.5) / 0x100000000, 0, 1);
    ages.push(age);
    values.push(Math.round(lmsValueAtZ({ L: L(age), M: M(age), S: S(age) }, z) ?? 1));
  }
  return { ages, values };
}

const sizes = process.argv.includes("--quick") ? [1_000, 10_000] : [1_000, 3_000, 10_000, 30_000];
console.log("donors   fit ms (best of runs)   runs   fits   edf L / M / S          converged");
for (const n of sizes) {
  const { ages, values } = donors(n, 20261201);
  const runs = n <= 10_000 ? 3 : 1;
  let best = Infinity;
  let fit = null;
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    fit = fitLms(ages, values, { seed: 1 });
    best = Math.min(best, performance.now() - t0);
  }
  if (fit === null) continue;
  const edf = [fit.edf.L, fit.edf.M, fit.edf.S].map((e) => e.toFixed(2)).join(" / ");
  console.log(
    `${String(n).padEnd(8)} ${best.toFixed(0).padStart(22)} ${String(runs).padStart(6)} ${String(fit.fits).padStart(6)}   ${edf.padEnd(22)} ${fit.converged}`,
  );
}
