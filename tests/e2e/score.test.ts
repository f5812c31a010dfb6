import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "../support/demo-users";
import { axeViolations } from "./support/axe";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function signInAs(page: Page, role: Role) {
  const user = demoUser(role);
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
}

/** Picks an analyte in a combobox: types, then chooses the option by its visible name. */
async function pickAnalyte(page: Page, label: string, typed: string, option: RegExp) {
  const box = page.getByRole("combobox", { name: label, exact: true });
  await box.fill(typed);
  await page.getByRole("option", { name: option }).click();
}

/** The scoring API's own answer for one item, through the page's session: what the page must show. */
async function apiScore(page: Page, item: Record<string, unknown>) {
  const res = await page.request.post("/api/v1/scores", { data: { items: [item] } });
  expect(res.status()).toBe(200);
  return (await res.json()) as {
    results: { z: number | null; percentile: number | null; percentileBound?: string; flag: string; cautions: string[] }[];
    cautionTexts: Record<string, string>;
  };
}

// The demo seed (db/demo-studies.ts): potassium, sodium, creatinine (by sex) and others in force
// since 2025-01-06 as version 1; alkaline phosphatase only awaiting sign-off.
describe("a clinician scores a patient value", () => {
  it("finds an analyte from the overview, scores it, and reads the flag, z, percentile, chart and cautions", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "clinician");
    const nav = page.getByRole("navigation", { name: "Main" });
    expect((await nav.getByRole("link").allTextContents()).map((t) => t.trim())).toEqual(["Overview", "Score", "Intervals", "Account"]);

    // The overview leads with the search box.
    expect(await axeViolations(page)).toEqual([]);
    const search = page.getByRole("search", { name: "Find an analyte to score" });
    await search.getByLabel("Analyte").fill("potas");
    await search.getByRole("button", { name: "Find and score" }).click();
    await page.waitForURL("/score?q=potas");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Score a patient value");
    expect(await page.locator("main").textContent()).toContain("supports and does not replace the laboratory's licensed direction");
    await page.getByTestId("score-empty").waitFor();

    // An analyte with no interval in force is listed with the reason and cannot be chosen.
    const box = page.getByRole("combobox", { name: "Analyte", exact: true });
    await box.fill("alk");
    // (The demo's children's ALP, ALPC, has age curves in force; the adults' ALP has nothing in force yet.)
    const alp = page.getByRole("option", { name: /^Alkaline phosphatase ALP\b/ });
    expect(await alp.getAttribute("aria-disabled")).toBe("true");
    expect(await alp.textContent()).toContain("awaiting the director's sign-off");
    // The search finds by LOINC code too (potassium is 2823-3 in the demo catalogue).
    await box.fill("2823-3");
    await page.getByRole("option", { name: /Potassium/ }).click();
    expect(await box.inputValue()).toBe("Potassium (K)");
    expect(await page.getByLabel("Unit", { exact: true }).inputValue()).toBe("mmol/L");

    await page.getByLabel("Value", { exact: true }).fill("5.8");
    await page.getByLabel("Sex").selectOption("F");
    await page.getByLabel("Age (years)").fill("54");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    const card = page.getByTestId("score-card");
    await card.waitFor();

    const expected = await apiScore(page, { analyte: "K", value: 5.8, sex: "F", ageYears: 54 });
    const r = expected.results[0];
    expect(await card.getByTestId("flag").textContent()).toBe(r.flag);
    expect(r.flag).toBe("H");
    expect(await card.getByRole("heading", { level: 2 }).textContent()).toBe("Potassium (K): above the reference interval");
    expect(await card.getByTestId("value-against-interval").textContent()).toMatch(/^5\.8 mmol\/L against the reference interval \d\.\d–\d\.\d mmol\/L for /);
    // z with 2 decimals, the percentile with 1 and "> 99.9" at the extreme (UX.md, Numbers), as the
    // API computed them; a bound (the value beyond the reference data) is said in words.
    const bound = r.percentileBound ? `${r.percentileBound} ` : "";
    expect(await card.getByTestId("z").textContent()).toBe(`${bound}${r.z!.toFixed(2)}`);
    const p = r.percentile!;
    expect(await card.getByTestId("percentile").textContent()).toBe(`${bound}${p >= 99.95 ? (bound ? "99.9" : "> 99.9") : p.toFixed(1)}`);
    // The chart: a canvas, its caption and the text alternative.
    const chart = card.getByTestId("reference-chart");
    expect(await chart.locator("canvas").count()).toBe(1);
    expect(await chart.locator("figcaption").textContent()).toContain("the dark marker is this value");
    expect(await chart.locator(".sr-only").textContent()).toContain("This value: 5.8 mmol/L");
    expect(await card.getByTestId("version-line").textContent()).toContain("Interval version 1, in force since 2025-01-06");
    // Every caution the API gave, in full, in the card itself.
    const cautions = card.getByTestId("cautions");
    for (const code of r.cautions) {
      expect(await cautions.locator(`[data-caution="${code}"]`).textContent()).toBe(expected.cautionTexts[code]);
    }
    expect(await cautions.textContent()).toContain("they are not a diagnosis");
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, "score-card-1280");
    await page.setViewportSize({ width: 820, height: 1000 });
    await screenshot(page, "score-card-820");
    await context.close();
  });

  it("keeps what was typed and says what to do when a value cannot be scored", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "clinician");
    await page.goto("/score");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    expect(await page.locator("#row1-analyte-hint").textContent()).toBe("Choose an analyte from the list.");
    // Haemoglobin is partitioned by sex only (no combined partition): without the sex the service refuses the item.
    await pickAnalyte(page, "Analyte", "haem", /Haemoglobin/);
    await page.getByLabel("Value", { exact: true }).fill("131");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    const notice = page.getByTestId("item-error");
    await notice.waitFor();
    expect(await notice.textContent()).toContain("Haemoglobin (HGB): not scored.");
    expect(await notice.textContent()).toContain("Give the patient's sex");
    expect(await page.getByLabel("Value", { exact: true }).inputValue()).toBe("131");
    await page.getByLabel("Sex").selectOption("M");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    await page.getByTestId("score-card").waitFor();
    expect(await page.getByTestId("value-against-interval").textContent()).toContain("for male");
    await context.close();
  });

  it("scores a panel of one patient in one table, each caution listed once with the rows it applies to", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "clinician");
    await page.goto("/score");
    await page.getByRole("button", { name: "Panel (several analytes)" }).click();
    await page.getByLabel("Sex").selectOption("M");
    await page.getByLabel("Age (years)").fill("61");
    await pickAnalyte(page, "Analyte 1", "sodium", /Sodium/);
    await page.getByLabel("Value 1", { exact: true }).fill("131");
    await pickAnalyte(page, "Analyte 2", "K", /Potassium/);
    await page.getByLabel("Value 2", { exact: true }).fill("4.1");
    await page.getByRole("button", { name: "Add an analyte" }).click();
    await pickAnalyte(page, "Analyte 3", "crea", /Creatinine/);
    await page.getByLabel("Value 3", { exact: true }).fill("1.3");
    await page.getByLabel("Unit 3", { exact: true }).fill("mg/dL");
    await page.getByRole("button", { name: "Score the panel" }).click();
    const table = page.getByTestId("panel-table");
    await table.waitFor();
    const row = (code: string) => table.locator(`tr[data-analyte="${code}"]`);
    expect(await table.locator("tbody tr").count()).toBe(3);
    const na = (await apiScore(page, { analyte: "NA", value: 131, sex: "M", ageYears: 61 })).results[0];
    expect(await row("NA").getByTestId("flag").textContent()).toBe(na.flag);
    // 131 mmol/L is below the lowest of the demo's 240 sodium reference results: z and percentile are bounds.
    expect(na.percentileBound).toBe("below");
    expect(await row("NA").locator("td").nth(4).textContent()).toBe(`below ${na.z!.toFixed(2)}`);
    expect(await row("K").getByTestId("flag").textContent()).toBe("N");
    // 1.3 mg/dL of creatinine (113.12 g/mol, the demo catalogue) is 114.9 µmol/L: converted before scoring.
    expect(await row("CREA").locator("td").first().textContent()).toBe("115");
    expect(await row("CREA").textContent()).toContain("umol/L");
    const cautions = page.getByTestId("panel-cautions");
    const general = cautions.locator('[data-caution="general"]');
    expect(await general.textContent()).toContain("they are not a diagnosis");
    expect(await general.textContent()).toContain("Applies to every row.");
    expect(await cautions.locator('[data-caution="unit-converted"]').textContent()).toContain("Applies to CREA.");
    // Once per code.
    const codes = await cautions.locator("li").evaluateAll((lis) => lis.map((li) => li.getAttribute("data-caution")));
    expect(new Set(codes).size).toBe(codes.length);
    expect(await axeViolations(page)).toEqual([]);
    await screenshot(page, "score-panel-1280");
    await page.setViewportSize({ width: 820, height: 1000 });
    await screenshot(page, "score-panel-820");
    await context.close();
  });
});

describe("the intervals register", () => {
  for (const role of ["clinician", "admin", "scientist", "director"] as const) {
    it(`${role} opens Intervals from the sidebar and reads what is in force`, async () => {
      const { context, page } = await newPage(browser);
      await signInAs(page, role);
      await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Intervals" }).click();
      await page.waitForURL("/intervals");
      const register = page.getByTestId("intervals-register");
      await register.waitFor();
      const potassium = register.locator('tr[data-analyte="K"]');
      expect(await potassium.textContent()).toContain("Version 1");
      expect(await potassium.textContent()).toContain("in force since 2025-01-06");
      expect(await potassium.textContent()).toContain("Nonparametric, n = ");
      // Creatinine has one row with its two partitions.
      expect(await register.locator('tr[data-analyte="CREA"] li').allTextContents()).toEqual(expect.arrayContaining(["F", "M"]));
      expect(await page.getByTestId("not-in-force").textContent()).toContain("Alkaline phosphatase");
      expect(await axeViolations(page)).toEqual([]);
      await page.getByRole("link", { name: "Sodium", exact: true }).click();
      await page.waitForURL("/intervals/NA");
      await page.getByTestId("version-1").waitFor();
      // Sodium has a draft version 2 (the demo's electrode change): only the lab roles see the history.
      const lab = role === "scientist" || role === "director";
      expect(await page.getByTestId("version-2").count()).toBe(lab ? 1 : 0);
      expect(await page.getByRole("link", { name: "Open the version's review" }).count()).toBe(lab ? 2 : 0);
      expect(await axeViolations(page)).toEqual([]);
      if (role === "clinician" || role === "scientist") {
        await page.goto("/intervals");
        await page.getByTestId("intervals-register").waitFor();
        await screenshot(page, `intervals-${role}-1280`);
        await page.setViewportSize({ width: 820, height: 1000 });
        await screenshot(page, `intervals-${role}-820`);
        await page.goto("/intervals/NA");
        await page.getByTestId("version-1").waitFor();
        await screenshot(page, `intervals-na-${role}-820`);
      }
      await context.close();
    });
  }
});
