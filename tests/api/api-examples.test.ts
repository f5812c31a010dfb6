import { execFileSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { API_EXAMPLES, apiExample, curlCommand, errorExamples, UNKNOWN_KEY_EXAMPLE } from "@/lib/api/examples";
import { analyteIntervalsSchema, scoreResponseSchema } from "@/lib/scores/schemas";
import { BASE_URL } from "../support/http-session";
import { demoLisKey, fetchWithKey } from "../support/lis";

/**
 * Runs an example exactly as the API page prints it, through bash and curl, with the two shell
 * variables the page tells the reader to set. A curl configuration file in a scratch HOME adds the
 * HTTP status after the body, so the printed command itself is not changed for the test.
 */
function runAsPrinted(command: string, key: string): { status: number; body: string } {
  const home = mkdtempSync(path.join(tmpdir(), "bellwether-curl-"));
  writeFileSync(path.join(home, ".curlrc"), 'write-out = "\\n%{http_code}"\n');
  const out = execFileSync("bash", ["-c", command], {
    env: { ...process.env, HOME: home, BELLWETHER_URL: BASE_URL, BELLWETHER_KEY: key },
    encoding: "utf8",
  });
  const cut = out.lastIndexOf("\n");
  return { status: Number(out.slice(cut + 1)), body: out.slice(0, cut) };
}

type Result = { ref?: string; error?: unknown; flag: string; value: number; censored: string | null; percentileBound?: string; cautions: string[]; interval: { unit: string }; analyte: { code: string } };

function scoredAsPrinted(id: string): { results: Result[]; cautionTexts: Record<string, string> } {
  const { status, body } = runAsPrinted(curlCommand(apiExample(id)), demoLisKey());
  expect(status, body).toBe(200);
  const answer = JSON.parse(body);
  // The answer has the shape the OpenAPI document gives it.
  expect(scoreResponseSchema.safeParse(answer).error).toBeUndefined();
  return answer;
}

describe("the API page's examples, run as printed against the served demo with its LIS key", () => {
  it("covers every example", () => {
    expect(API_EXAMPLES.map((e) => e.id).sort()).toEqual(["fhir-score", "intervals", "score-batch", "score-censored", "score-one", "score-units"]);
  });

  it("scores one potassium value", () => {
    const { results } = scoredAsPrinted("score-one");
    expect(results).toHaveLength(1);
    expect(results[0]).toMatchObject({ ref: "1001/K", analyte: { code: "K" }, value: 4.9, censored: null, interval: { unit: "mmol/L" } });
    expect(["L", "N", "H"]).toContain(results[0].flag);
  });

  it("scores a panel in order: codes, a LOINC code, exact ages and a converted unit", () => {
    const { results, cautionTexts } = scoredAsPrinted("score-batch");
    expect(results.map((r) => r.ref)).toEqual(["2002/NA", "2002/K", "2002/CREA", "2002/HGB"]);
    expect(results.map((r) => r.analyte.code)).toEqual(["NA", "K", "CREA", "HGB"]);
    expect(results.every((r) => r.error === undefined)).toBe(true);
    // 1.3 mg/dL ÷ 113.12 g/mol (creatinine's molar mass in db/seed.ts) × 10 dL/L × 1000 µmol/mmol = 114.92 µmol/L (arithmetic).
    expect(results[2].interval.unit).toBe("umol/L");
    expect(results[2].value).toBeCloseTo(114.92, 2);
    for (const code of results.flatMap((r) => r.cautions)) expect(cautionTexts[code]).toMatch(/\.$/);
  });

  it("scores censored values at the censoring point with the percentile as a bound", () => {
    const { results } = scoredAsPrinted("score-censored");
    expect(results.map((r) => r.ref)).toEqual(["3003/TSH", "3003/ALT"]);
    expect(results[0]).toMatchObject({ censored: "<", value: 0.01, percentileBound: "below" });
    expect(results[1]).toMatchObject({ censored: ">", value: 1000, percentileBound: "above" });
  });

  it("converts glucose from mg/dL before scoring", () => {
    const { results, cautionTexts } = scoredAsPrinted("score-units");
    // 99 mg/dL ÷ 180.156 g/mol (glucose, db/seed.ts) × 10 dL/L = 5.4953 mmol/L (arithmetic).
    expect(results[0]).toMatchObject({ ref: "4004/GLU", interval: { unit: "mmol/L" } });
    expect(results[0].value).toBeCloseTo(5.4953, 3);
    expect(results[0].cautions.some((c) => /unit|convert/i.test(cautionTexts[c]))).toBe(true);
  });

  it("scores the FHIR Observation", () => {
    const { status, body } = runAsPrinted(curlCommand(apiExample("fhir-score")), demoLisKey());
    expect(status, body).toBe(200);
    const observation = JSON.parse(body);
    expect(observation.resourceType).toBe("Observation");
    expect(observation.referenceRange.length).toBeGreaterThan(0);
    expect(observation.interpretation.length).toBe(1);
    expect(observation.component.length).toBe(2);
  });

  it("reads potassium's intervals in force", () => {
    const { status, body } = runAsPrinted(curlCommand(apiExample("intervals")), demoLisKey());
    expect(status, body).toBe(200);
    const answer = JSON.parse(body);
    expect(analyteIntervalsSchema.safeParse(answer).error).toBeUndefined();
    expect(answer.analyte).toMatchObject({ code: "K", unit: "mmol/L", loinc: "2823-3" });
    expect(answer.version).not.toBeNull();
    expect(answer.partitions.every((p: { referenceRange?: unknown }) => p.referenceRange !== undefined)).toBe(true);
  });
});

describe("the API page's error examples are what the server answers", () => {
  it("an unknown key: 401 problem+json", () => {
    const { status, body } = runAsPrinted(curlCommand(apiExample("score-one")), UNKNOWN_KEY_EXAMPLE);
    expect(status).toBe(401);
    expect(JSON.parse(body)).toEqual(errorExamples.unknownKey);
  });

  it("an unknown analyte in a batch: an item error in its place", async () => {
    const res = await fetchWithKey(demoLisKey(), "/api/v1/scores", { method: "POST", body: errorExamples.itemErrorRequest });
    expect(res.status).toBe(200);
    expect((await res.json()).results[0]).toEqual(errorExamples.itemError);
  });

  it("FHIR without a key: 401 OperationOutcome", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/fhir/Observation/$score`, {
      method: "POST",
      headers: { "content-type": "application/fhir+json" },
      body: JSON.stringify(apiExample("fhir-score").body),
    });
    expect(res.status).toBe(401);
    expect(await res.json()).toEqual(errorExamples.fhirUnauthenticated);
  });
});
