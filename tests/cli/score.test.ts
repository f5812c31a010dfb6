import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";

const exec = promisify(execFile);
const root = path.resolve(__dirname, "../..");
const fixture = (name: string) => path.join("tests/fixtures", name);

/** Runs the real command line: npx tsx scripts/bellwether.ts score …; returns code and output. */
async function bellwether(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await exec("npx", ["tsx", "scripts/bellwether.ts", "score", ...args], { cwd: root });
    return { code: 0, stdout, stderr };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

describe("bellwether score", () => {
  it("prints z, percentile and flag per value as one JSON document", async () => {
    const r = await bellwether("--model", fixture("scoring-model-potassium.json"), "4.3", "5.5", "<3.4", "7");
    expect(r.code).toBe(0);
    expect(r.stderr).toBe("");
    const out = JSON.parse(r.stdout);
    expect(out.unit).toBe("mmol/L");
    expect(out.interval).toEqual({ low: 3.5, high: 5.1, obx7: "3.5-5.1" });
    expect(out.scores.map((s: { flag: string }) => s.flag)).toEqual(["N", "H", "L", "HH"]);
    // z = (5.5 − 4.3)/0.4 = 3; R: 100 * pnorm(3) = 99.86501019683699. 1e-9 for Φ differences.
    expect(out.scores[1].z).toBeCloseTo(3, 12);
    expect(out.scores[1].percentile).toBeCloseTo(99.86501019683699, 9);
    expect(out.scores[0]).toMatchObject({ value: 4.3, censored: null, z: 0, percentile: 50, cautions: ["general"] });
    expect(out.scores[2]).toMatchObject({ value: 3.4, censored: "<", percentileBound: "below" });
    expect(out.scores[2].cautions).toEqual(["general", "value-censored"]);
  }, 30_000);

  it("exits 2 with one line on stderr for a bad model file, a bad value or a missing model", async () => {
    // Run side by side: each call pays tsx's start-up.
    const [bad, value, missing, nofile] = await Promise.all([
      bellwether("--model", fixture("scoring-model-bad.json"), "4"),
      bellwether("--model", fixture("scoring-model-potassium.json"), "4.1", "abc"),
      bellwether("4.1"),
      bellwether("--model", "tests/fixtures/no-such-model.json", "4"),
    ]);
    expect(bad.code).toBe(2);
    expect(bad.stdout).toBe("");
    expect(bad.stderr).toBe(
      "bellwether: model file tests/fixtures/scoring-model-bad.json is not a valid partition: model.lambda: a box-cox model needs lambda\n",
    );
    expect(value.code).toBe(2);
    expect(value.stderr).toBe('bellwether: "abc" is not a number\n');
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe("bellwether: --model is required\n");
    expect(nofile.stderr).toBe("bellwether: cannot read model file tests/fixtures/no-such-model.json: ENOENT\n");
  }, 60_000);
});
