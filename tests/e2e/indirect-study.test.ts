import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { mixture, PERIOD_FROM, routineResultsCsv } from "../support/routine-results";
import { axeViolations } from "./support/axe";
import { launchBrowser, screenshotsAtBothWidths, signIn, walkJourney } from "./support/browser";

const shots = screenshotsAtBothWidths;

let browser: Browser;
/** The R-simulated mixture lognormal-5k-10 (scripts/fixtures/indirect-mixtures.R: 10% diseased, truth in indirect-mixtures.json). */
const MIX = mixture("lognormal-5k-10");
/** Rows each cleaning step must remove, by construction of the file (tests/support/routine-results.ts). */
const EXTRAS = { beforePeriod: 40, inpatient: 300, flagged: 25, repeats: 120 };
const TOTAL = MIX.n + EXTRAS.beforePeriod + EXTRAS.inpatient + EXTRAS.flagged + EXTRAS.repeats;
const FILE = path.join(mkdtempSync(path.join(tmpdir(), "bw-indirect-")), "alt-routine.csv");

beforeAll(async () => {
  writeFileSync(FILE, routineResultsCsv(MIX.values, EXTRAS));
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("a scientist takes an indirect study from routine results to a draft version", () => {
  it("opens the study, uploads routine results, cleans and estimates, reads the chart and advice, and drafts a version the page names as indirect", async () => {
    expect(await walkJourney(browser, "indirect", walkThrough)).toEqual([]);
  });
});

async function walkThrough(page: Page) {
  await signIn(page, demoUser("scientist").email, demoUser("scientist").password);
  await page.waitForURL("/");
  await page.goto("/studies");

  const form = page.getByRole("form", { name: "New study" });
  await form.getByLabel("Analyte").selectOption("ALT");
  await form.getByLabel("Title").fill(`ALT from routine results ${Date.now()}`);
  await form.getByLabel(/Indirect, from routine results/).check();
  await form.getByRole("button", { name: "Open the study" }).click();
  await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
  expect(await page.getByTestId("study-kind").textContent()).toBe("Indirect (routine results)");
  // The steps of direct studies are not on the page of an indirect study.
  expect(await page.locator("section#screening").count()).toBe(0);
  expect(await page.locator("section#partitions").count()).toBe(0);
  expect(await page.getByTestId("donor-results-next").textContent()).toContain("pseudonymous patient_key");

  await page.locator("#donor-file").setInputFiles(FILE);
  await page.getByRole("button", { name: "Check the file" }).click();
  await page.getByTestId("validation-report").waitFor();
  await page.getByRole("button", { name: `Commit ${TOTAL.toLocaleString("en")} valid rows` }).click();
  await page
    .getByTestId("upload-notice")
    .filter({ hasText: `Stored ${TOTAL.toLocaleString("en")} routine results from alt-routine.csv.` })
    .waitFor();
  await page.reload();

  const section = page.locator("section#indirect");
  // The form offers the file's settings and flags; inpatient is excluded by default, outpatient kept.
  expect(await section.getByLabel(/^inpatient/).isChecked()).toBe(true);
  expect(await section.getByLabel(/^outpatient/).isChecked()).toBe(false);
  await section.getByLabel("Period from").fill(PERIOD_FROM);
  await section.getByRole("button", { name: "Clean and estimate" }).click();
  await section.getByTestId("indirect-chart").locator("canvas").waitFor({ timeout: 60_000 });
  expect(await section.getByRole("status").filter({ hasText: "Estimated" }).textContent()).toMatch(
    new RegExp(`^Estimated women and men, all ages from ${MIX.n.toLocaleString("en")} results: `),
  );

  // The path from the file to the values estimated, with the rows each step removed (by construction).
  const steps = await section.getByTestId("indirect-cleaning").locator("tbody tr").allInnerTexts();
  expect(steps.map((s) => s.split("\t").map((c) => c.trim()))).toEqual([
    ["Routine results", "in the study", "—", TOTAL.toLocaleString("en")],
    ["period", `kept results collected from ${PERIOD_FROM} to 2025-09-01`, String(EXTRAS.beforePeriod), (TOTAL - EXTRAS.beforePeriod).toLocaleString("en")],
    ["settings", "excluded the settings inpatient", String(EXTRAS.inpatient), (TOTAL - EXTRAS.beforePeriod - EXTRAS.inpatient).toLocaleString("en")],
    ["flags", "excluded every flagged result", String(EXTRAS.flagged), (MIX.n + EXTRAS.repeats).toLocaleString("en")],
    ["one-per-patient", "kept each patient's first result", String(EXTRAS.repeats), MIX.n.toLocaleString("en")],
  ]);
  // The limits: within 10% of the true interval's width of the truth R drew the mixture from
  // (tests/fixtures/indirect-mixtures.json; the stats tests hold the engine to this on the same file).
  const limits = await section.getByTestId("indirect-limits").locator("tbody tr").first().locator("td").allInnerTexts();
  const lower = Number(limits[1].split(" ")[0]);
  const upper = Number(limits[2].split(" ")[0]);
  const width = MIX.trueUpper - MIX.trueLower;
  expect(Math.abs(lower - MIX.trueLower) / width).toBeLessThan(0.1);
  expect(Math.abs(upper - MIX.trueUpper) / width).toBeLessThan(0.1);
  expect(await section.getByTestId("indirect-limits").textContent()).toContain("Bhattacharya (second opinion)");
  expect(await section.getByTestId("indirect-advice").textContent()).toContain("Do not trust it when the non-diseased share is below about 60%");
  expect(await section.getByTestId("indirect-fit").textContent()).toContain("Non-diseased share");
  await shots(page, "indirect-01-estimate");

  const draft = page.locator("section#draft");
  await draft.getByRole("button", { name: "Create draft version" }).click();
  const created = draft.getByRole("status").filter({ hasText: "Drafted" });
  await created.waitFor();
  expect(await created.textContent()).toMatch(/^Drafted version \d+ with 1 partition estimated indirectly \(women and men, all ages\)\.$/);
  await shots(page, "indirect-02-draft");
  expect(await axeViolations(page)).toEqual([]);

  await draft.getByRole("link", { name: /^version \d+$/ }).click();
  await page.waitForURL(/\/versions\/[0-9a-f-]{36}$/);
  expect(await page.locator("main").textContent()).toContain("Indirect: truncated maximum likelihood on routine results");
  await shots(page, "indirect-03-version");
}
