import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "../support/demo-users";
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

function rowOf(page: Page, code: string) {
  return page.getByRole("row").filter({ has: page.getByRole("cell", { name: code, exact: true }) });
}

describe("a scientist keeps the analyte catalogue", () => {
  const code = `E${Date.now().toString(36).toUpperCase()}`.slice(0, 12);

  it("adds an analyte after correcting the fields the page marks, then edits it", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "scientist");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Analytes" }).click();
    await page.waitForURL("/analytes");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Analytes");
    // The demo catalogue (db/seed.ts): glucose in mmol/L with its critical limits to 1 decimal.
    await expect.poll(() => rowOf(page, "GLU").textContent()).toContain("2.5 – 25.0");

    const form = page.getByRole("form", { name: "New analyte" });
    await form.getByLabel("Code", { exact: true }).fill(code);
    await form.getByLabel("Name", { exact: true }).fill("Magnesium");
    await form.getByLabel("Unit (UCUM)").fill("mmol/litre");
    await form.getByLabel("Display decimals").fill("2");
    await form.getByLabel("LOINC code").fill("2601-4");
    await form.getByLabel("Critical low").fill("1.5");
    await form.getByLabel("Critical high").fill("0.4");
    await form.getByRole("button", { name: "Add analyte" }).click();

    await form.getByText("Please correct the marked fields.").waitFor();
    // LOINC Users' Guide 12 C's algorithm: the check digit of 2601 is 3 (magnesium, METHODS.md §11).
    expect(await form.locator("#new-loinc-error").textContent()).toBe(
      "The check digit of LOINC code 2601-4 is wrong: for 2601 it is 3. Check the code against the LOINC database.",
    );
    expect(await form.locator("#new-unit-error").textContent()).toContain('"mmol/litre" is not a UCUM unit.');
    expect(await form.locator("#new-criticalHigh-error").textContent()).toBe(
      "The critical low limit (1.5) must be below the critical high limit (0.4).",
    );
    // What was typed is still there.
    expect(await form.getByLabel("Name", { exact: true }).inputValue()).toBe("Magnesium");
    expect(await form.getByLabel("Unit (UCUM)").inputValue()).toBe("mmol/litre");
    expect(await rowOf(page, code).count()).toBe(0);
    await screenshot(page, "analytes-errors");

    await form.getByLabel("Unit (UCUM)").fill("mmol/L");
    await form.getByLabel("LOINC code").fill("2601-3");
    await form.getByLabel("Critical low").fill("0.4");
    await form.getByLabel("Critical high").fill("1.5");
    await form.getByRole("button", { name: "Add analyte" }).click();
    await page.getByRole("status").filter({ hasText: `Added ${code} (Magnesium, mmol/L) to the catalogue.` }).waitFor();
    await rowOf(page, code).waitFor();
    expect(await rowOf(page, code).textContent()).toContain("0.40 – 1.50");

    await rowOf(page, code).getByRole("button", { name: `Edit ${code}` }).click();
    const edit = page.getByRole("form", { name: `Edit ${code}` });
    expect(await edit.getByLabel("Unit (UCUM)").inputValue()).toBe("mmol/L");
    await edit.getByLabel("Review period (months)").fill("12");
    await edit.getByLabel("Molar mass (g/mol)").fill("24.305");
    await edit.getByRole("button", { name: `Save ${code}` }).click();
    // A molar mass needs its source: the field says so, the change is not saved.
    await edit.locator("#edit-molarMassSource-error").filter({ hasText: "Name the published source of the molar mass." }).waitFor();
    await edit.getByLabel("Source of the molar mass").fill("Mg; Young DS, Ann Intern Med 1987;106:114-129");
    await edit.getByRole("button", { name: `Save ${code}` }).click();
    await page.getByRole("status").filter({ hasText: `Saved ${code} (Magnesium, mmol/L).` }).waitFor();
    await expect.poll(() => rowOf(page, code).textContent()).toContain("every 12 months");
    await screenshot(page, "analytes-scientist");

    await context.close();
  });
});

describe("reading the catalogue", () => {
  it("a clinician may open it by its address, read-only, though it is not in the navigation", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "clinician");
    expect(await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Analytes" }).count()).toBe(0);
    const response = await page.goto("/analytes");
    expect(response?.status()).toBe(200);
    await rowOf(page, "K").waitFor();
    expect(await rowOf(page, "K").textContent()).toContain("2823-3");
    expect(await page.getByRole("form").count()).toBe(0);
    expect(await page.getByRole("button", { name: /^Edit / }).count()).toBe(0);
    expect(await page.getByText("Read-only: laboratory scientists and the director keep this catalogue.").count()).toBe(1);
    await screenshot(page, "analytes-clinician");
    await context.close();
  });
});
