import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, signIn } from "./support/browser";

/**
 * The production build runs under its content security policy (no 'unsafe-eval', scripts only by
 * nonce; tests/api/content-security-policy.test.ts reads the headers): Chromium reports no
 * violation while a clinician signs in and scores a value (the chart drawn by Chart.js), and a
 * scientist opens a study with its charts.
 */
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** A page that records every CSP violation the browser reports, and every console message about one. */
async function watchedPage(): Promise<{ page: Page; violations: string[] }> {
  const { context, page } = await newPage(browser);
  const violations: string[] = [];
  await context.exposeFunction("__reportCspViolation", (text: string) => violations.push(text));
  await context.addInitScript(() => {
    document.addEventListener("securitypolicyviolation", (e) => {
      (window as unknown as { __reportCspViolation: (t: string) => void }).__reportCspViolation(`${e.violatedDirective} ${e.blockedURI} ${e.sourceFile}:${e.lineNumber}`);
    });
  });
  page.on("console", (message) => {
    if (/content security policy/i.test(message.text())) violations.push(message.text());
  });
  return { page, violations };
}

describe("pages under the production content security policy", () => {
  it("a clinician signs in and scores a value with its chart: no violation", async () => {
    const { page, violations } = await watchedPage();
    await page.goto("/sign-in");
    const clinician = demoUser("clinician");
    await signIn(page, clinician.email, clinician.password);
    await page.waitForURL("/");
    await page.goto("/score");
    const box = page.getByRole("combobox", { name: "Analyte", exact: true });
    await box.fill("2823-3");
    await page.getByRole("option", { name: /Potassium/ }).click();
    await page.getByLabel("Value", { exact: true }).fill("5.8");
    await page.getByLabel("Sex").selectOption("F");
    await page.getByLabel("Age (years)").fill("54");
    await page.getByRole("button", { name: "Score", exact: true }).click();
    await page.getByTestId("score-card").getByTestId("reference-chart").locator("canvas").waitFor();
    await page.goto("/intervals");
    await page.getByRole("heading", { level: 1 }).waitFor();
    expect(violations).toEqual([]);
  });

  it("a scientist opens a study with its charts: no violation", async () => {
    const { page, violations } = await watchedPage();
    const scientist = demoUser("scientist");
    await signIn(page, scientist.email, scientist.password);
    await page.waitForURL("/");
    await page.goto("/studies");
    await page.locator('main a[href^="/studies/"]').first().click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}/);
    await page.getByRole("heading", { level: 1 }).waitFor();
    await page.waitForLoadState("networkidle");
    expect(violations).toEqual([]);
  });

  for (const role of ["director", "admin"] as const) {
    it(`the ${role} opens every section of the navigation: no violation`, async () => {
      const { page, violations } = await watchedPage();
      const user = demoUser(role);
      await signIn(page, user.email, user.password);
      await page.waitForURL("/");
      const nav = page.getByRole("navigation", { name: "Main" });
      const hrefs = await nav.getByRole("link").evaluateAll((links) => links.map((a) => a.getAttribute("href") as string));
      expect(hrefs.length).toBeGreaterThan(3);
      for (const href of hrefs) {
        await page.goto(href);
        await page.getByRole("heading", { level: 1 }).waitFor();
        await page.waitForLoadState("networkidle");
      }
      expect(violations).toEqual([]);
    });
  }
});
