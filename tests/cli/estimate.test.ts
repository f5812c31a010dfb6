import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";

const run = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const FIX = (name: string) => path.join("tests/fixtures", name);
// The binary `npx tsx` resolves to, called directly to spare npx's start-up on every run.
const TSX = path.join(ROOT, "node_modules/.bin/tsx");

async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(TSX, ["scripts/bellwether.ts", "estimate", ...args], {
      cwd: ROOT,
    });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

describe.concurrent("bellwether estimate", () => {
  it("prints one JSON document and the same one for the same input and seed", async () => {
    const a = await cli([FIX("estimate-lognormal-80.csv"), "--seed", "3"]);
    const b = await cli([FIX("estimate-lognormal-80.csv"), "--seed=3"]);
    expect(a.code).toBe(0);
    expect(a.stderr).toBe("");
    expect(a.stdout).toBe(b.stdout);
    const doc = JSON.parse(a.stdout);
    expect(doc.n).toBe(80);
    expect(doc.nonparametric.lower).toBeTypeOf("number");
    expect(doc.recommended).toBe("parametric");
  }, 30_000);

  it("applies --outliers and --transform", async () => {
    const r = await cli([FIX("estimate-gaussian-150-outlier.csv"), "--outliers", "dixon", "--transform", "none"]);
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.excluded).toEqual([{ value: 46, reason: "dixon" }]);
    expect(doc.n).toBe(149);
    expect(doc.parametric.transform).toBe("none");
    expect(doc.nonparametric.lowerCi).toHaveLength(2);
    expect(doc.recommended).toBe("nonparametric");
  }, 30_000);

  const bad: [string, string[], RegExp][] = [
    ["a missing value column", [FIX("estimate-no-value-column.csv")], /no "value" column/],
    ["a non-numeric value, with its line", [FIX("estimate-missing-value.csv")], /line 3: value "" is not a number/],
    ["an empty file", [FIX("estimate-empty.csv")], /is empty/],
    ["a missing file", [FIX("no-such-file.csv")], /no such file/],
    ["an unknown option value", [FIX("estimate-lognormal-80.csv"), "--transform", "sqrt"], /--transform must be one of/],
    ["a bad seed", [FIX("estimate-lognormal-80.csv"), "--seed", "x"], /--seed must be an integer/],
    ["no file", [], /needs a CSV FILE/],
  ];
  for (const [label, args, message] of bad) {
    it(`exits 2 with one line on stderr for ${label}`, async () => {
      const r = await cli(args);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
      expect(r.stderr).toMatch(message);
    }, 30_000);
  }
});
