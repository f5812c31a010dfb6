import fs from "node:fs";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";
import { launchBrowser, newPage, screenshot, screenshotsAtBothWidths, signIn } from "./support/browser";

const shots = screenshotsAtBothWidths;

let browser: Browser;
let studyId: string;

/** 80 women and 80 men (scripts/fixtures/study-analysis.R); M017 is a gross high value (11.80 mmol/L). */
const FIXTURE = fs.readFileSync(path.join(__dirname, "../fixtures/uploads/study-analysis.csv"));

beforeAll(async () => {
  if (!ready) return;
  browser = await launchBrowser();
  const cookie = await signInOverHttp(demoUser("scientist").email, demoUser("scientist").password);
  const opened = await fetch(`${BASE_URL}/api/v1/studies`, {
    method: "POST",
    headers: { cookie, "content-type": "application/json" },
    body: JSON.stringify({ analyte: "GLU", title: `Fasting glucose, adults ${Date.now()}`, method: "Hexokinase" }),
  });
  expect(opened.status).toBe(201);
  studyId = (await opened.json()).id;
  const form = new FormData();
  form.set("file", new Blob([FIXTURE]), "study-analysis.csv");
  const report = await (await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads`, { method: "POST", headers: { cookie }, body: form })).json();
  const committed = await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads/${report.id}/commit`, { method: "POST", headers: { cookie } });
  expect(await committed.json()).toEqual({ status: "committed", stored: 160 });
});
afterAll(async () => {
  await browser?.close();
});

/**
 * The walk-through needs the study page (the page frame's work) and the estimate and version
 * routes (the estimates work); each lands on main on its own, so until all are there the test
 * says it is skipped rather than failing on a missing page.
 */
const ready = ["app/(lab)/studies/[id]/page.tsx", "app/api/v1/studies/[id]/estimates/route.ts", "app/api/v1/interval-versions/route.ts"].every((f) =>
  fs.existsSync(path.join(__dirname, "../..", f)),
);

describe.skipIf(!ready)("a scientist takes a study from donor results to a draft interval version", () => {
  it("screens, confirms an outlier, assesses and chooses partitions by sex, estimates each and drafts a version", async () => {
    const { context, page } = await newPage(browser);
    try {
      await walkThrough(page);
    } catch (e) {
      await screenshot(page, "analysis-failure");
      throw e;
    } finally {
      await context.close();
    }
  });
});

/** The scientist's way through steps 2 to 5 of the study page, with screenshots of each. */
async function walkThrough(page: Page) {
  const pageErrors: string[] = [];
  page.on("pageerror", (e) => pageErrors.push(e.stack ?? e.message));
  page.on("console", (m) => {
    if (m.type() === "error") pageErrors.push(m.text());
  });
  try {
    await steps(page);
  } finally {
    if (pageErrors.length > 0) console.error(`errors in the page:\n${pageErrors.join("\n")}`);
  }
  expect(pageErrors).toEqual([]);
}

async function steps(page: Page) {
  await signIn(page, demoUser("scientist").email, demoUser("scientist").password);
  await page.waitForURL("/");
  await page.goto(`/studies/${studyId}`);

  const screening = page.locator("section#screening");
  await screening.getByTestId("screening-empty").waitFor();
  expect(await screening.textContent()).toContain("nothing is excluded by the screen itself");

  // Horn over the men: the 11.80 mmol/L of M017 is proposed, and nothing is excluded yet.
  await screening.getByLabel("Partition").selectOption({ label: "Male" });
  await screening.getByRole("button", { name: "Run screen" }).click();
  const proposal = screening.getByTestId("proposal-M017");
  await proposal.waitFor();
  expect(await proposal.textContent()).toContain("11.8");
  expect(await screening.getByTestId("screen-result").textContent()).toContain("Nothing has been excluded.");
  await screening.getByTestId("strip-chart").locator("canvas").waitFor();
  await shots(page, "analysis-01-screen");

  // A decision needs a reason: without one the page says so and sends nothing.
  await proposal.getByRole("button", { name: "Exclude donor M017" }).click();
  await proposal.getByText("Give a reason before you decide").waitFor();
  await proposal.getByLabel("Reason for donor M017").fill("Not fasting: the donor had eaten an hour before.");
  await proposal.getByRole("button", { name: "Exclude donor M017" }).click();
  await proposal.getByText("Excluded", { exact: true }).waitFor();
  const excluded = screening.getByRole("table", { name: "Exclusions in effect" });
  await excluded.getByRole("cell", { name: "M017", exact: true }).waitFor();
  expect(await excluded.textContent()).toContain("Not fasting: the donor had eaten an hour before.");
  await shots(page, "analysis-02-outlier-excluded");

  // Partitions by sex: Harris-Boyd and Lahti side by side, then the plan.
  const partitions = page.locator("section#partitions");
  await partitions.getByRole("button", { name: "Assess by sex" }).click();
  await partitions.getByTestId("assessment").waitFor();
  expect(await partitions.getByRole("table", { name: "Harris-Boyd and Lahti side by side" }).textContent()).toMatch(/Partition/);
  expect((await partitions.getByTestId("assessment-summary").textContent())?.length).toBeGreaterThan(10);
  await partitions.getByLabel("Separate limits for female and male donors").check();
  await partitions.getByRole("button", { name: "Use these partitions" }).click();
  await partitions.getByText(/Saved: 2 partitions/).waitFor();
  await shots(page, "analysis-03-partitions");

  // Estimates: one per partition of the plan, methods side by side with the charts.
  const estimates = page.locator("section#estimates");
  for (const label of ["Female", "Male"]) {
    const part = estimates.getByTestId(`estimate-${label}`);
    await part.getByRole("button", { name: "Estimate", exact: true }).click();
    await part.getByRole("table", { name: "Methods side by side" }).waitFor();
    await part.getByTestId("histogram-chart").locator("canvas").waitFor();
    await part.getByTestId("qq-chart").locator("canvas").waitFor();
    expect(await part.textContent()).toMatch(/Recommended/);
  }
  await estimates.getByTestId("partitions-chart").locator("canvas").waitFor();
  await shots(page, "analysis-04-estimates");

  // The draft: the recommended method preselected per partition, the analyte's critical limits.
  const draft = page.locator("section#draft");
  expect(await draft.getByLabel("Critical low (mmol/L)").inputValue()).not.toBe("");
  await draft.getByLabel("Note for the director").fill("First interval for fasting glucose from the 2026 donor study.");
  await draft.getByRole("button", { name: "Create draft version" }).click();
  await draft.getByText(/Draft version \d+ created\./).waitFor();
  const card = draft.locator("[data-testid^=version-]").first();
  expect(await card.textContent()).toContain("Draft");
  expect(await card.getByRole("row").count()).toBe(3);
  await shots(page, "analysis-05-draft");

  // Revising the draft: the men's limits by the robust method instead.
  const number = (await card.getAttribute("data-testid"))!.replace("version-", "");
  await card.getByRole("button", { name: `Revise version ${number}` }).click();
  const revise = draft.getByRole("form", { name: `Revise version ${number}` });
  await revise.getByLabel("Method for Male").selectOption("robust");
  await revise.getByRole("button", { name: `Save version ${number}` }).click();
  await draft.getByText(`Version ${number} revised.`).waitFor();
  await expect.poll(() => draft.getByTestId(`version-${number}`).getByRole("row", { name: /Male/ }).textContent()).toContain("Robust");
  await shots(page, "analysis-06-draft-revised");
}
