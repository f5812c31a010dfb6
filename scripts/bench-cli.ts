/**
 * Times the whole `bellwether estimate` process on 10⁶ donor values against the same work in R.
 *   npx tsx scripts/bench-cli.ts [--runs 5] [--n 1000000] [--checkout DIR]
 * Writes a CSV (donor, sex, value; lognormal ALT-like values from the seeded generator) to a
 * temporary folder, runs the command line once untimed (it builds its bundle if needed), then
 * times, in turn and `--runs` times each:
 *   npm run -s bellwether -- estimate FILE --outliers none --transform box-cox   (what users type)
 *   node scripts/cli/launch.cjs estimate FILE …                               (the same, without npm)
 *   Rscript scripts/bench/estimate.R FILE                                     (the same work in base R)
 * and prints the median and fastest wall time of each and the ratios of the medians; where
 * /usr/bin/time exists, also the median CPU time (user + system, the process and its children),
 * which a busy shared machine disturbs less than the wall time. With
 * `--checkout DIR` the npm command runs in another checkout (an older commit, for a before/after
 * figure). R is skipped, with a message, where Rscript is absent. Prints figures, asserts nothing.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import normal from "@stdlib/stats-base-dists-normal";
import { createRandom } from "../lib/stats/random";

const ROOT = path.resolve(__dirname, "..");

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(name);
  return i >= 0 && i + 1 < process.argv.length ? process.argv[i + 1] : fallback;
}

const runs = Number(option("--runs", "5"));
const n = Number(option("--n", "1000000"));
const checkout = path.resolve(option("--checkout", ROOT));

function writeCsv(file: string): void {
  const rng = createRandom(2024);
  const lines = new Array<string>(n + 1);
  lines[0] = "donor,sex,value";
  for (let i = 0; i < n; i++) {
    const u = (rng.nextUint32() + 0.5) / 0x100000000;
    const value = Math.round(Math.exp(Math.log(25) + 0.4 * normal.quantile(u, 0, 1)) * 10) / 10;
    lines[i + 1] = `D${String(i + 1).padStart(7, "0")},${i % 2 === 0 ? "F" : "M"},${value}`;
  }
  writeFileSync(file, `${lines.join("\n")}\n`);
}

interface Contender {
  label: string;
  command: string;
  args: string[];
  cwd: string;
  times: number[];
  cpu: number[];
}

const TIME = "/usr/bin/time";
const hasTime = existsSync(TIME);

function runOnce(c: Contender, cpuFile: string): number {
  const [command, args] = hasTime ? [TIME, ["-f", "%U %S", "-o", cpuFile, c.command, ...c.args]] : [c.command, c.args];
  const t0 = performance.now();
  const r = spawnSync(command, args, { cwd: c.cwd, stdio: ["ignore", "ignore", "pipe"], encoding: "utf8" });
  const ms = performance.now() - t0;
  if (r.error || r.status !== 0) {
    throw new Error(`${c.label} failed (${r.error?.message ?? `exit ${r.status}`}): ${r.stderr?.trim() ?? ""}`);
  }
  c.times.push(ms);
  if (hasTime) {
    const [user, system] = readFileSync(cpuFile, "utf8").trim().split(/\s+/).map(Number);
    c.cpu.push((user + system) * 1000);
  }
  return ms;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const dir = mkdtempSync(path.join(os.tmpdir(), "bellwether-bench-"));
try {
  const file = path.join(dir, "donors.csv");
  writeCsv(file);
  const estimateArgs = ["estimate", file, "--outliers", "none", "--transform", "box-cox"];
  const contenders: Contender[] = [
    { label: "npm run -s bellwether", command: "npm", args: ["run", "-s", "bellwether", "--", ...estimateArgs], cwd: checkout, times: [], cpu: [] },
  ];
  if (checkout === ROOT) {
    contenders.push({ label: "node scripts/cli/launch.cjs", command: process.execPath, args: ["scripts/cli/launch.cjs", ...estimateArgs], cwd: ROOT, times: [], cpu: [] });
  }
  const hasR = spawnSync("Rscript", ["--version"], { stdio: "ignore" }).error === undefined;
  if (hasR) {
    contenders.push({ label: "Rscript scripts/bench/estimate.R", command: "Rscript", args: [path.join(ROOT, "scripts/bench/estimate.R"), file], cwd: ROOT, times: [], cpu: [] });
  } else {
    console.log("Rscript not found: R's side is skipped (Debian: apt-get install r-base-core).");
  }
  console.log(`${n} values in ${file}; ${runs} runs each, in turn; ${os.cpus().length} cores, load ${os.loadavg()[0].toFixed(1)}`);
  const cpuFile = path.join(dir, "cpu.txt");
  runOnce(contenders[0], cpuFile); // builds the bundle if a source changed; not counted
  contenders[0].times.length = 0;
  contenders[0].cpu.length = 0;
  for (let r = 0; r < runs; r++) for (const c of contenders) runOnce(c, cpuFile);
  const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
  for (const c of contenders) {
    const cpu = hasTime ? `   CPU median ${s(median(c.cpu))}` : "";
    console.log(`${c.label.padEnd(34)} wall median ${s(median(c.times))}   fastest ${s(Math.min(...c.times))}${cpu}`);
  }
  const r = contenders.find((c) => c.command === "Rscript");
  if (r) {
    for (const c of contenders.filter((x) => x !== r)) {
      const cpu = hasTime ? `, CPU ${(median(c.cpu) / median(r.cpu)).toFixed(2)}` : "";
      console.log(`ratio ${c.label} / R: wall ${(median(c.times) / median(r.times)).toFixed(2)}${cpu} (medians)`);
    }
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
