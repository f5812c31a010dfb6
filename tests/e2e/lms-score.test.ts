/**
 * A clinician scores a child's value against LMS age curves (issue 11) on the score page, and
 * reads the curves on the intervals page. The curves are the 600-donor fixture's fit, put in
 * force for an analyte of this test's own (tests/support/lms-scores.ts).
 */
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { fixtureCurves, lmsPartition } from "../support/lms-scores";
import { createAnalyte, putInForce, uniqueCode, waitFor } from "../support/scores";
import { signInAll } from "../support/studies";
import { BASE_URL } from "../support/http-session";
import { axeViolations } from "./support/axe";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

const { pool } = testDatabase();
const CODE = uniqueCode("ALPE");
const NAME = `Alkaline phosphatase, children ${CODE}`;
let browser: Browser;

beforeAll(async () => {
  const cookies = await signInAll();
  await createAnalyte(cookies, { code: CODE, name: NAME, unit: "U/L", decimals: 0 });
  const { model, n } = fixtureCurves();
  await putInForce(pool, cookies, CODE, [lmsPartition(model, n)]);
  await waitFor(async () => {
    const res = await fetch(`${BASE_URL}/api/v1/analytes/${CODE}/intervals`, { headers: { cookie: cookies.clinician } });
    return (await res.json()).version !== null;
  });
  browser = await launchBrowser();
}, 120_000);
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

async function signInAsClinician(page: Page) {
  const user = demoUser("clinician");
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
}

describe("scoring a child against age curves", () => {
  it("shows the exact age used, the curves at that age, the distribution there and the caution", async () => {
    const { context, page } = await newPage(browser);
    await signInAsClinician(page);
    await page.goto(`/score?analyte=${CODE}`);
    const box = page.getByRole("combobox", { name: "Analyte", exact: true });
    expect(await box.inputValue()).toBe(`${NAME} (${CODE})`);
    await page.getByLabel("Value", { exact: true }).fill("270");
    await page.getByLabel("Birth date").fill("2022-01-01");
    await page.getByLabel("Collected on").fill("2026-07-02");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    const card = page.getByTestId("score-card");
    await card.waitFor();

    // The page's answer is the API's own (the same session).
    const res = await page.request.post("/api/v1/scores", { data: { items: [{ analyte: CODE, value: 270, birthDate: "2022-01-01", collectedAt: "2026-07-02" }] } });
    const r = (await res.json()).results[0];
    expect(r.model.kind).toBe("lms");
    expect(await card.getByTestId("flag").textContent()).toBe(r.flag);
    // 2022-01-01 → 2026-07-02: 4 + 182/365 = 4.4986 years (arithmetic), shown with 2 decimals.
    expect(await card.textContent()).toContain("4.50 years");
    expect(await card.getByTestId("value-against-interval").textContent()).toContain(
      `against the reference interval ${r.interval.low.toFixed(0)}–${r.interval.high.toFixed(0)} U/L at the exact age of 4.5 years, from the laboratory's continuous age curves (ages 0.03 years to 17.97 years).`,
    );
    expect(await card.getByTestId("lms-at-age").textContent()).toContain(`a median of ${r.model.M.toFixed(0)} U/L`);
    await card.getByTestId("reference-chart").waitFor();
    expect(await card.getByTestId("reference-chart").textContent()).toContain("the LMS age curves' distribution at 4.5 years");
    expect(await card.locator('[data-caution="limits-at-age"]').textContent()).toContain("exact age");
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, "lms-score-1280");
    await page.setViewportSize({ width: 820, height: 1000 });
    await screenshot(page, "lms-score-820");

    // An age outside the curves is said with their range, and the typed input stays.
    await page.setViewportSize({ width: 1280, height: 900 });
    await page.getByLabel("Birth date").fill("2000-01-01");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    const error = page.getByTestId("item-error");
    await error.waitFor();
    expect(await error.textContent()).toContain("follows age curves that cover 0.03 to 17.97 years; the patient's age, 26.5 years, is outside them");
    expect(await page.getByLabel("Value", { exact: true }).inputValue()).toBe("270");
    await context.close();
  });

  it("shows the curves and the limits at ages on the analyte's intervals page", async () => {
    const { context, page } = await newPage(browser);
    await signInAsClinician(page);
    await page.goto(`/intervals/${CODE}`);
    await page.getByTestId("lms-curves-chart").waitFor();
    const table = page.getByTestId("lms-limits-table");
    const rows = await table.locator("tbody tr").allTextContents();
    expect(rows[0]).toMatch(/^0\.03 years/);
    expect(rows.at(-1)).toMatch(/^17\.97 years/);
    // The row at 4 years gives the limits the intervals route gives at that age.
    const api = await (await page.request.get(`/api/v1/analytes/${CODE}/intervals?ages=4`)).json();
    const at4 = api.partitions[0].atAges[0];
    const cells = await table.locator("tbody tr", { hasText: /^4 years/ }).locator("td").allTextContents();
    expect([cells[1], cells[3]]).toEqual([at4.low.toFixed(0), at4.high.toFixed(0)]);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, "lms-intervals-1280");
    await context.close();
  });
});
