import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it, vi } from "vitest";
import { run as runEstimate } from "@/scripts/cli/estimate";
import { CliError } from "@/scripts/cli/cli-error";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const FIX = (name: string) => path.join(ROOT, "tests/fixtures", name);
// The binary `npx tsx` resolves to, called directly to spare npx's start-up on every run.
const TSX = path.join(ROOT, "node_modules/.bin/tsx");

async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await exec(TSX, ["scripts/bellwether.ts", "estimate", ...args], {
      cwd: ROOT,
    });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

/** Runs the command in-process and returns what it printed. */
async function inProcess(args: string[]): Promise<string> {
  let out = "";
  const spy = vi.spyOn(process.stdout, "write").mockImplementation((chunk) => {
    out += String(chunk);
    return true;
  });
  try {
    expect(await runEstimate(args)).toBe(0);
  } finally {
    spy.mockRestore();
  }
  return out;
}

// Child processes are slow to start on a busy machine: the end-to-end cases are few and run
// side by side; the many input checks run in-process through the same `run`.
describe.concurrent("bellwether estimate (as a process)", () => {
  it("prints one JSON document and the same one for the same input and seed", async () => {
    const [a, b] = await Promise.all([
      cli([FIX("estimate-lognormal-80.csv"), "--seed", "3"]),
      cli([FIX("estimate-lognormal-80.csv"), "--seed=3"]),
    ]);
    expect(a.code).toBe(0);
    expect(a.stderr).toBe("");
    expect(a.stdout).toBe(b.stdout);
    const doc = JSON.parse(a.stdout);
    expect(doc.n).toBe(80);
    expect(doc.nonparametric.lower).toBeTypeOf("number");
    expect(doc.recommended).toBe("parametric");
  }, 60_000);

  it("exits 2 with one line on stderr for bad input", async () => {
    const r = await cli([FIX("estimate-missing-value.csv")]);
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/^bellwether: .*line 3: value "" is not a number\n$/);
  }, 60_000);
});

describe("bellwether estimate (in-process)", () => {
  it("applies --outliers and --transform and ignores other columns", async () => {
    const doc = JSON.parse(
      await inProcess([FIX("estimate-gaussian-150-outlier.csv"), "--outliers", "dixon", "--transform", "none"]),
    );
    expect(doc.excluded).toEqual([{ value: 46, reason: "dixon" }]);
    expect(doc.n).toBe(149);
    expect(doc.parametric.transform).toBe("none");
    expect(doc.nonparametric.lowerCi).toHaveLength(2);
    expect(doc.recommended).toBe("nonparametric");
  });

  it("chooses the scale by the likelihood-ratio tests and prints them", async () => {
    // R on the file's 80 values (Horn's screen keeps them all): with
    // ll(l) = -n/2*log(mean((y - mean(y))^2)) + (l - 1)*sum(log(x)), optimize on [-3, 3] gives
    // λ̂ = 0.03072792, 2*(ll(λ̂) - ll(1)) = 18.281 > qchisq(.95, 1) = 3.841459 (not raw) and
    // 2*(ll(λ̂) - ll(0)) = 0.01949175 (ln kept). R's cat printed 7 significant digits; each
    // check allows half a unit of the last one.
    const doc = JSON.parse(await inProcess([FIX("estimate-lognormal-80.csv")]));
    expect(doc.excluded).toEqual([]);
    expect(doc.parametric.transform).toBe("ln");
    expect(doc.parametric.scaleChoice.lambdaHat).toBeCloseTo(0.03072792, 6);
    expect(doc.parametric.scaleChoice.lrtAgainstRaw.statistic).toBeCloseTo(18.281, 3);
    expect(doc.parametric.scaleChoice.lrtAgainstLn.statistic).toBeCloseTo(0.01949175, 6);
  });

  it("gives the same document in-process as the same seed twice", async () => {
    const args = [FIX("estimate-lognormal-80.csv"), "--seed", "5"];
    expect(await inProcess(args)).toBe(await inProcess(args));
  });

  const bad: [string, string[], RegExp][] = [
    ["a missing value column", [FIX("estimate-no-value-column.csv")], /no "value" column \(columns: donor, result\)/],
    ["a non-numeric value, with its line", [FIX("estimate-missing-value.csv")], /line 3: value "" is not a number/],
    ["an empty file", [FIX("estimate-empty.csv")], /is empty/],
    ["a missing file", [FIX("no-such-file.csv")], /no such file/],
    ["an unknown option value", [FIX("estimate-lognormal-80.csv"), "--transform", "sqrt"], /--transform must be one of/],
    ["an unknown option", [FIX("estimate-lognormal-80.csv"), "--bins", "3"], /unknown option --bins/],
    ["a bad seed", [FIX("estimate-lognormal-80.csv"), "--seed", "x"], /--seed must be an integer/],
    ["no file", [], /needs a CSV FILE/],
  ];
  for (const [label, args, message] of bad) {
    it(`throws a CliError for ${label}`, async () => {
      const p = runEstimate(args);
      await expect(p).rejects.toBeInstanceOf(CliError);
      await expect(runEstimate(args)).rejects.toThrow(message);
    });
  }
});
