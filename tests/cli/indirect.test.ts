import { execFile } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it, vi } from "vitest";
import { run as runIndirect } from "@/scripts/cli/indirect";
import { CliError } from "@/scripts/cli/cli-error";
import { parseRoutineCell, readRoutineValues } from "@/scripts/cli/read-routine-values";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const FIX = (name: string) => path.join(ROOT, "tests/fixtures", name);
const TSH = FIX("indirect/cli-tsh-2k.csv");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");

type Result = { code: number; stdout: string; stderr: string };

async function spawn(file: string, args: string[]): Promise<Result> {
  try {
    const { stdout, stderr } = await exec(file, args, { cwd: ROOT });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as Result;
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

const cli = (args: string[]) => spawn(TSX, ["scripts/bellwether.ts", "indirect", ...args]);
const launch = (args: string[]) => spawn(process.execPath, ["scripts/cli/launch.cjs", "indirect", ...args]);

async function inProcess(args: string[]): Promise<string> {
  let out = "";
  const spy = vi.spyOn(process.stdout, "write").mockImplementation((chunk) => {
    out += String(chunk);
    return true;
  });
  try {
    expect(await runIndirect(args)).toBe(0);
  } finally {
    spy.mockRestore();
  }
  return out;
}

const CONTRACT_KEYS = [
  "n",
  "lower",
  "upper",
  "lowerCi",
  "upperCi",
  "lambda",
  "mu",
  "sigma",
  "fraction",
  "truncation",
  "chiSquare",
  "secondOpinion",
  "warnings",
];

// Each run bootstraps 200 replicates: the process runs go one after another, not side by side,
// to keep the machine free for the rest of the suite.
describe("bellwether indirect (as a process)", () => {
  it("prints one JSON document with the contract's keys, the same through tsx and the built launcher", async () => {
    const a = await cli([TSH, "--seed", "3"]);
    const built = await launch([TSH, "--seed=3"]);
    expect(a.code).toBe(0);
    expect(a.stderr).toBe("");
    expect(built).toEqual(a);
    const doc = JSON.parse(a.stdout);
    expect(Object.keys(doc)).toEqual(CONTRACT_KEYS);
    expect(doc.n).toBe(2000);
  }, 180_000);

  it("exits 2 with one line on stderr for bad input, through the launcher too", async () => {
    const r = await cli([FIX("estimate-no-value-column.csv")]);
    const built = await launch([FIX("estimate-no-value-column.csv")]);
    expect(r).toEqual({ code: 2, stdout: "", stderr: expect.stringMatching(/^bellwether: .*has no "value" column \(columns: donor, result\)\n$/) });
    expect(built).toEqual(r);
  }, 120_000);
});

describe("bellwether indirect (in-process)", () => {
  it("reads censored values, counts them in n, and prints the contract's document", async () => {
    const doc = JSON.parse(await inProcess([TSH]));
    expect(Object.keys(doc)).toEqual(CONTRACT_KEYS);
    // The R script wrote 2,000 rows: 16 "<0.30" and 10 ">20.00" among them (grep -c).
    expect(doc.n).toBe(2000);
    expect(doc.warnings).toContain(
      "16 below 0.3 and 10 above 20 were reported censored; they count in n and in the likelihood of the open end cells, never as numbers.",
    );
    expect(doc.lower).toBeLessThan(doc.upper);
    expect(doc.lowerCi[0]).toBeLessThanOrEqual(doc.lowerCi[1]);
    expect(doc.upperCi[0]).toBeLessThanOrEqual(doc.upperCi[1]);
    expect(doc.fraction).toBeGreaterThan(0);
    expect(doc.fraction).toBeLessThanOrEqual(1);
    expect(doc.truncation).toHaveLength(2);
    expect(doc.secondOpinion).toEqual({ method: "bhattacharya", lower: expect.any(Number), upper: expect.any(Number) });
    expect(typeof doc.chiSquare).toBe("number");
  }, 60_000);

  const dir = mkdtempSync(path.join(tmpdir(), "bellwether-indirect-"));
  const file = (name: string, text: string) => {
    const p = path.join(dir, name);
    writeFileSync(p, text);
    return p;
  };
  const many = (xs: string[]) => `value\n${xs.join("\n")}\n`;
  const okValues = Array.from({ length: 30 }, (_, i) => String(4 + (i % 10) / 10));

  const bad: [string, string[], RegExp][] = [
    ["a missing value column", [FIX("estimate-no-value-column.csv")], /no "value" column \(columns: donor, result\)/],
    ["an empty value, with its line", [FIX("estimate-missing-value.csv")], /line 3: value "" is not a number or a censored value such as "<0\.5"/],
    ["text in the value column", [file("text.csv", many([...okValues, "high"]))], /line 32: value "high" is not a number or a censored value/],
    ["a censoring sign without a limit", [file("sign.csv", many([...okValues, "<"]))], /line 32: value "<" is not a number or a censored value/],
    ["an empty file", [FIX("estimate-empty.csv")], /is empty/],
    ["a header without values", [file("header.csv", "value\n")], /has a header but no values|is empty/],
    ["a missing file", [FIX("no-such-file.csv")], /no such file/],
    ["a negative value", [file("negative.csv", many([...okValues, "-1.5"]))], /values\[30\] = -1\.5 is not positive/],
    ["too few values", [file("few.csv", many(["4.1", "4.2", "<0.5"]))], /at least 20 measured values \(got 2\)/],
    ["values that are all equal", [file("equal.csv", many(Array(30).fill("4.0")))], /all equal/],
    ["a bad seed", [TSH, "--seed", "x"], /--seed must be an integer \(got "x"\)/],
    ["a seed without a value", [TSH, "--seed"], /--seed needs a value/],
    ["an unknown option", [TSH, "--replicates", "5"], /unknown option --replicates/],
    ["two files", [TSH, TSH], /only one FILE may be given/],
    ["no file", [], /needs a CSV FILE/],
  ];
  for (const [label, args, message] of bad) {
    it(`throws a CliError for ${label}`, async () => {
      await expect(runIndirect(args)).rejects.toBeInstanceOf(CliError);
      await expect(runIndirect(args)).rejects.toThrow(message);
    });
  }
});

describe("routine values", () => {
  it("reads numbers and censored values as the laboratory writes them", () => {
    expect(parseRoutineCell(" 4.5 ")).toBe(4.5);
    expect(parseRoutineCell("<0.5")).toEqual({ value: 0.5, side: "below" });
    expect(parseRoutineCell("<= 0.5")).toEqual({ value: 0.5, side: "below" });
    expect(parseRoutineCell(">1000")).toEqual({ value: 1000, side: "above" });
    expect(parseRoutineCell(">=1000")).toEqual({ value: 1000, side: "above" });
    expect(parseRoutineCell("")).toBeNull();
    expect(parseRoutineCell("<x")).toBeNull();
    expect(parseRoutineCell("n/a")).toBeNull();
  });

  it("keeps the estimate's file contract: delimiter, quotes and byte-order mark", () => {
    expect(readRoutineValues('id;value\r\n1;"<0.5"\r\n2;4.5\r\n', "f.csv")).toEqual([{ value: 0.5, side: "below" }, 4.5]);
    expect(readRoutineValues("\ufeffvalue\n4.5\n\n5\n", "f.csv")).toEqual([4.5, 5]);
    expect(() => readRoutineValues('id;value\r\n1;"<0,5"\r\n', "f.csv")).toThrow(/line 2: value "<0,5" is not a number/);
  });
});
