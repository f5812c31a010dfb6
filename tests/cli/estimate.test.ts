import { execFile, execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
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

  it("gives the same document and errors through the built command line that npm runs", async () => {
    // package.json's "bellwether" script: scripts/cli/launch.cjs builds .cli-build/ when a
    // source changed and runs the bundle. Its output must be the TypeScript entry's, byte for byte.
    const launch = async (args: string[]) => {
      try {
        const { stdout, stderr } = await exec(process.execPath, ["scripts/cli/launch.cjs", "estimate", ...args], { cwd: ROOT });
        return { code: 0, stdout, stderr };
      } catch (e) {
        const err = e as { code: number; stdout: string; stderr: string };
        return { code: err.code, stdout: err.stdout, stderr: err.stderr };
      }
    };
    const args = [FIX("estimate-lognormal-80.csv"), "--seed", "3"];
    const [built, source] = await Promise.all([launch(args), cli(args)]);
    expect(built).toEqual(source);
    expect(built.code).toBe(0);
    const bad = await launch([FIX("estimate-missing-value.csv")]);
    expect(bad).toEqual({ code: 2, stdout: "", stderr: expect.stringMatching(/^bellwether: .*line 3: value "" is not a number\n$/) });
  }, 120_000);

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
    // The fixture's value column sorted (`sort -g`): min 3.7, …, 5.85, 46 on data row 150.
    // Dixon/Reed (METHODS.md §4.1): D/R = (46 − 5.85)/(46 − 3.7) = 40.15/42.3 = 0.94917… ≥ 1/3.
    expect(doc.excluded).toEqual([
      {
        value: 46,
        reason: "dixon",
        index: 149,
        explanation: "D/R = 0.9492 ≥ 1/3 (high)",
        evidence: {
          rule: "dixon",
          side: "high",
          kind: "single",
          gap: expect.closeTo(40.15, 12),
          range: expect.closeTo(42.3, 12),
          ratio: expect.closeTo(40.15 / 42.3, 12),
          threshold: 1 / 3,
          step: 1,
        },
      },
    ]);
    expect(doc.n).toBe(149);
    expect(doc.parametric.transform).toBe("none");
    expect(doc.nonparametric.lowerCi).toHaveLength(2);
    expect(doc.recommended).toBe("nonparametric");
  });

  it("applies the screen by default and says so in the document", async () => {
    const doc = JSON.parse(await inProcess([FIX("estimate-gaussian-150-outlier.csv"), "--outliers", "dixon"]));
    expect(doc.screening).toEqual({ outliers: "dixon", rule: "dixon", mode: "apply", applied: true, valuesGiven: 150 });
    expect(doc.provenance.options).toEqual({ outliers: "dixon", screening: "apply", transform: "auto", seed: 1 });
    expect(doc.proposed).toEqual(doc.excluded);
  });

  it("only proposes with --screening propose, as the app does", async () => {
    const doc = JSON.parse(
      await inProcess([FIX("estimate-gaussian-150-outlier.csv"), "--outliers", "dixon", "--screening", "propose"]),
    );
    expect(doc.screening).toMatchObject({ mode: "propose", applied: false });
    expect(doc.excluded).toEqual([]);
    expect(doc.proposed.map((p: { value: number }) => p.value)).toEqual([46]);
    expect(doc.n).toBe(150);
  });

  it("stamps the engine's version and commit", async () => {
    const doc = JSON.parse(await inProcess([FIX("estimate-lognormal-80.csv")]));
    // Expected from outside the code: package.json's version and git's own answer.
    const version = JSON.parse(readFileSync(path.join(ROOT, "package.json"), "utf8")).version;
    const head = execFileSync("git", ["rev-parse", "HEAD"], { cwd: ROOT, encoding: "utf8" }).trim();
    expect(doc.provenance.engine).toMatchObject({ name: "bellwether", version, commit: head });
    expect(typeof doc.provenance.engine.uncommittedChanges).toBe("boolean");
    expect(doc.provenance.robust).toMatchObject({ madNormal: 0.6745, cLocation: 3.7 });
    expect(doc.provenance.bootstrap.replicates).toBe(1000);
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
    [
      "an unknown screening mode",
      [FIX("estimate-lognormal-80.csv"), "--screening", "drop"],
      /--screening must be one of propose, apply \(got "drop"\)/,
    ],
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
