import { execFile } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { beforeAll, describe, expect, it } from "vitest";
import { runCli } from "@/scripts/cli/main";


const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
// 600 donors from scripts/fixtures/lms-curves.R's curves: the contract, not the accuracy.
const FIXTURE = path.join(ROOT, "tests/fixtures/lms/lms-cli-600.csv");

async function cli(command: string, args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await exec(command === "tsx" ? TSX : process.execPath, [
      command === "tsx" ? "scripts/bellwether.ts" : "scripts/cli/launch.cjs",
      "lms",
      ...args,
    ], { cwd: ROOT });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

describe.concurrent("bellwether lms (as a process)", () => {
  it("prints the issue's JSON document, the same for the same input and seed", async () => {
    const [a, b] = await Promise.all([
      cli("tsx", [FIXTURE, "--at", "0.5,2,10,15.5", "--seed", "3"]),
      cli("tsx", [FIXTURE, "--at=0.5, 2, 10, 15.5", "--seed=3"]),
    ]);
    expect(a.code).toBe(0);
    expect(a.stderr).toBe("");
    expect(a.stdout).toBe(b.stdout);
    const doc = JSON.parse(a.stdout);
    expect(Object.keys(doc)).toEqual(["n", "at", "lower", "median", "upper", "L", "M", "S", "edf", "warnings"]);
    expect(doc.n).toBe(600);
    expect(doc.at).toEqual([0.5, 2, 10, 15.5]);
    for (const key of ["lower", "median", "upper", "L", "M", "S"]) expect(doc[key]).toHaveLength(4);
    expect(Object.keys(doc.edf)).toEqual(["L", "M", "S"]);
    // The fixture's true curves (scripts/fixtures/lms-curves.R): M(2) = 170 + 130·e^(−2/1.5) +
    // 80·e^(−(10.5/3)²) = 204.27; with 600 donors the fit is within several per cent
    // (SE of ln M about S/√(donors near 2 years) ≈ 0.21/√70 ≈ 0.025).
    expect(Math.abs(doc.median[1] / 204.27 - 1)).toBeLessThan(0.1);
    expect(doc.warnings.every((w: string) => typeof w === "string")).toBe(true);
  }, 120_000);

  it("gives the same output through the built command line that npm runs", async () => {
    const args = [FIXTURE, "--at", "1,9"];
    const [built, source] = await Promise.all([cli("launch", args), cli("tsx", args)]);
    expect(built).toEqual(source);
    expect(built.code).toBe(0);
  }, 180_000);

  it("exits 2 with one line on stderr for bad input", async () => {
    const r = await cli("tsx", [FIXTURE, "--at", "40"]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/^bellwether: .*age 40 is outside the donors' ages, [\d.]+ to [\d.]+ years; the curves are not extrapolated\n$/);
  }, 120_000);
});

describe("bellwether lms: bad input (in-process)", () => {
  let dir = "";
  const file = (name: string, text: string) => {
    const p = path.join(dir, name);
    writeFileSync(p, text);
    return p;
  };
  /** A valid donor CSV of n rows; `edit` changes row i's line. */
  const donors = (n: number, edit: (i: number, line: string) => string = (_, l) => l) =>
    ["age_years,value", ...Array.from({ length: n }, (_, i) => edit(i, `${(i * 0.3).toFixed(2)},${100 + (i % 9)}`))].join("\n");

  beforeAll(() => {
    dir = mkdtempSync(path.join(tmpdir(), "bellwether-lms-"));
  });

  async function stderrOf(args: string[]): Promise<{ code: number; stderr: string }> {
    let stderr = "";
    const code = await runCli(["lms", ...args], undefined, { writeErr: (t) => (stderr += t) });
    return { code, stderr };
  }

  it.each([
    [[], "lms needs a CSV FILE with age_years and value columns"],
    [["x.csv"], "--at is required: the ages in years at which to read the curves"],
    [["x.csv", "--at"], "--at needs a value"],
    [["x.csv", "--at", "1,two"], '--at: "two" is not an age in years'],
    [["x.csv", "--at", "1,,3"], '--at: "" is not an age in years'],
    [["x.csv", "--at", "-1"], "--at: age -1 is negative"],
    [["x.csv", "--at", "1", "--seed", "1.5"], '--seed must be an integer (got "1.5")'],
    [["x.csv", "--at", "1", "--smooth"], "unknown option --smooth"],
    [["x.csv", "y.csv", "--at", "1"], 'only one FILE may be given (got "x.csv" and "y.csv")'],
  ])("usage: %j", async (args, message) => {
    expect(await stderrOf(args as string[])).toEqual({ code: 2, stderr: `bellwether: ${message}\n` });
  });

  it("names the file and the line of bad data", async () => {
    const cases: [string, string, string][] = [
      ["empty.csv", "", "empty.csv is empty"],
      ["no-age.csv", "value\n1\n2\n", 'no-age.csv has no "age_years" column (columns: value)'],
      ["no-columns.csv", "age,result\n1,2\n", 'no-columns.csv has no "age_years" or "value" column (columns: age, result)'],
      ["header-only.csv", "age_years,value\n", "header-only.csv has a header but no donors"],
      ["text-value.csv", donors(60, (i, l) => (i === 4 ? "1.2,high" : l)), 'text-value.csv line 6: value "high" is not a number'],
      ["missing-age.csv", donors(60, (i, l) => (i === 0 ? ",120" : l)), 'missing-age.csv line 2: age_years "" is not a number'],
      ["negative-age.csv", donors(60, (i, l) => (i === 9 ? "-0.5,120" : l)), "negative-age.csv line 11: age_years -0.5 is negative"],
      ["zero-value.csv", donors(60, (i, l) => (i === 2 ? "3,0" : l)), "zero-value.csv line 4: value 0 is not positive; the LMS method needs values > 0"],
      ["censored.csv", donors(60, (i, l) => (i === 7 ? "3,<5" : l)), 'censored.csv line 9: value "<5" is not a number'],
      ["few.csv", donors(10), "few.csv: ages needs at least 50 values (got 10)"],
      ["one-age.csv", donors(60, (i) => `4,${100 + i}`), "one-age.csv: all donors have the same age; curves in age need a spread of ages"],
    ];
    for (const [name, text, message] of cases) {
      const p = file(name, text);
      const r = await stderrOf([p, "--at", "1"]);
      expect(r).toEqual({ code: 2, stderr: `bellwether: ${message.replace(name, p)}\n` });
    }
    const missing = path.join(dir, "nope.csv");
    expect(await stderrOf([missing, "--at", "1"])).toEqual({ code: 2, stderr: `bellwether: ${missing}: no such file\n` });
  }, 60_000);

  it("refuses an age outside the donors' ages", async () => {
    const p = file("range.csv", donors(60));
    // The file's ages run from 0.00 to 59 × 0.3 = 17.7 years.
    expect(await stderrOf([p, "--at", "2,18"])).toEqual({
      code: 2,
      stderr: `bellwether: ${p}: age 18 is outside the donors' ages, 0 to 17.7 years; the curves are not extrapolated\n`,
    });
  }, 60_000);
});
