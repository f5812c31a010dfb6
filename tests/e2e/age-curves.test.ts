import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ageCurveCsv, fixtureDonors } from "../support/age-curves";
import { demoUser } from "../support/demo-users";
import { axeViolations } from "./support/axe";
import { launchBrowser, screenshot, screenshotsAtBothWidths, signIn, walkJourney } from "./support/browser";

const shots = screenshotsAtBothWidths;

let browser: Browser;
/** 600 donors from scripts/fixtures/lms-curves.R's curves, with birth and collection dates. */
const FILE = path.join(mkdtempSync(path.join(tmpdir(), "bw-age-curves-")), "alp-children.csv");

beforeAll(async () => {
  writeFileSync(FILE, ageCurveCsv(fixtureDonors()));
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("a scientist takes an age-curve study from donors to a draft version", () => {
  it("opens the study, uploads donors with birth dates, fits the LMS curves, reads the chart and diagnostics, and drafts a version", async () => {
    expect(await walkJourney(browser, "age-curves", walkThrough)).toEqual([]);
  });
});

async function walkThrough(page: Page) {
  await signIn(page, demoUser("scientist").email, demoUser("scientist").password);
  await page.waitForURL("/");
  await page.goto("/studies");

  const form = page.getByRole("form", { name: "New study" });
  await form.getByLabel("Analyte").selectOption("ALPC");
  await form.getByLabel("Title").fill(`ALP, children 0-18 ${Date.now()}`);
  await form.getByLabel(/Age curves \(children\)/).check();
  await form.getByRole("button", { name: "Open the study" }).click();
  await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
  expect(await page.getByTestId("study-kind").textContent()).toBe("Age curves (LMS)");
  // The steps of direct studies are not on the page of an age-curve study.
  expect(await page.locator("section#screening").count()).toBe(0);
  expect(await page.locator("section#partitions").count()).toBe(0);
  expect(await page.getByTestId("donor-results-next").textContent()).toContain("an age-curve study needs exact ages");

  await page.locator("#donor-file").setInputFiles(FILE);
  await page.getByRole("button", { name: "Check the file" }).click();
  await page.getByTestId("validation-report").waitFor();
  await page.getByRole("button", { name: "Commit 600 valid rows" }).click();
  await page.getByTestId("upload-notice").filter({ hasText: "Stored 600 donor results from alp-children.csv." }).waitFor();

  const curves = page.locator("section#age-curves");
  await curves.getByRole("button", { name: "Fit the curves" }).click();
  await curves.getByTestId("centile-chart").locator("canvas").waitFor();
  expect(await curves.getByRole("status").filter({ hasText: "Fitted the curves" }).textContent()).toBe("Fitted the curves (both sexes together, n = 600).");
  expect(await curves.getByTestId("lms-advice").textContent()).toContain("600 donors fitted");
  expect(await curves.getByTestId("lms-sex-comparison").textContent()).toContain("Mean z against the combined curves");
  const limitRows = await curves.getByTestId("lms-limits-table").locator("tbody tr").allTextContents();
  expect(limitRows.length).toBeGreaterThan(10);
  expect(await curves.getByTestId("lms-coverage").locator("tbody tr").count()).toBeGreaterThanOrEqual(2);
  expect(await curves.getByTestId("worm-chart").count()).toBeGreaterThanOrEqual(2);
  await shots(page, "age-curves-01-fit");
  await curves.getByTestId("lms-diagnostics").scrollIntoViewIfNeeded();
  await screenshot(page, "age-curves-02-diagnostics-1280");

  const draft = page.locator("section#draft");
  await draft.getByRole("button", { name: "Create draft version" }).click();
  const created = draft.getByRole("status").filter({ hasText: "Drafted" });
  await created.waitFor();
  expect(await created.textContent()).toMatch(/^Drafted version \d+ with 1 partition of LMS curves \(both sexes together, /);
  await draft.getByTestId("age-curve-drafts").waitFor();
  await shots(page, "age-curves-03-draft");
  expect(await axeViolations(page)).toEqual([]);
}
