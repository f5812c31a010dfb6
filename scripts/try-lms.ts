import { readFileSync } from "node:fs";
import { fitLms } from "../lib/stats/lms-fit";
import { lmsAt } from "../lib/stats/lms-model";
import { lmsValueAtZ } from "../lib/stats/lms-z";
const truth = JSON.parse(readFileSync("/work/wt-lms-engine/tests/fixtures/lms/lms-truth.json", "utf8"));
const kappaArg = process.argv[2];
for (const seed of truth.seeds) {
  const rows = readFileSync(`/work/wt-lms-engine/tests/fixtures/lms/lms-seed-${seed}.csv`, "utf8").trim().split("\n").slice(1);
  const ages = rows.map((r) => Number(r.split(",")[0]));
  const values = rows.map((r) => Number(r.split(",")[1]));
  const t0 = performance.now();
  const fit = fitLms(ages, values, kappaArg ? { criterionPenalty: Number(kappaArg) } : {});
  const ms = performance.now() - t0;
  const errs: number[] = [];
  const line: string[] = [];
  truth.ages.forEach((a: number, i: number) => {
    const p = lmsAt(fit.model, a);
    const lo = lmsValueAtZ(p, -1.959963984540054)!;
    const hi = lmsValueAtZ(p, 1.959963984540054)!;
    const w = truth.upper[i] - truth.lower[i];
    const el = Math.abs(lo - truth.lower[i]) / w, eu = Math.abs(hi - truth.upper[i]) / w;
    errs.push(el, eu);
    line.push(`${a}:${el.toFixed(3)}/${eu.toFixed(3)}`);
  });
  const mean = errs.reduce((s, e) => s + e, 0) / errs.length;
  console.log(seed, `ms=${ms.toFixed(0)} fits=${fit.fits} conv=${fit.converged} edf L=${fit.edf.L.toFixed(2)} M=${fit.edf.M.toFixed(2)} S=${fit.edf.S.toFixed(2)} g=${fit.smoothing.L.log10LambdaPerDonor},${fit.smoothing.M.log10LambdaPerDonor},${fit.smoothing.S.log10LambdaPerDonor} restart=${fit.restarts.improved} mean=${mean.toFixed(4)} max=${Math.max(...errs).toFixed(3)}`);
  console.log("   ", line.join(" "));
}
