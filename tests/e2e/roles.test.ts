import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ROLES, type Role } from "@/lib/auth/roles";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

/** UX.md, "Navigation by role (sidebar order)", written out. */
const UX_NAVIGATION: Record<Role, string[]> = {
  scientist: ["Overview", "Studies", "Adoption checks", "Analytes", "Intervals", "Score", "Account"],
  director: ["Overview", "Sign-off queue", "Studies", "Adoption checks", "Analytes", "Intervals", "Score", "Audit trail", "Account"],
  clinician: ["Overview", "Score", "Intervals", "Account"],
  admin: ["Overview", "Users", "LIS connections", "Outbox", "Audit trail", "Intervals", "Score", "Account"],
};
/**
 * The sections whose pages exist so far; each later capability adds its own here. The sidebar
 * must show exactly UX.md's items among these, in UX.md's order.
 */
const BUILT_SECTIONS = [
  "Overview",
  "Users",
  "LIS connections",
  "Outbox",
  "Sign-off queue",
  "Studies",
  "Adoption checks",
  "Analytes",
  "Intervals",
  "Score",
  "Audit trail",
  "Account",
];

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("signing in as each role", () => {
  for (const role of ROLES) {
    it(`${role} signs in and sees the navigation of the role`, async () => {
      const { context, page } = await newPage(browser);
      const user = demoUser(role);
      await signIn(page, user.email, user.password);
      await page.waitForURL("/");
      expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe(`Welcome, ${user.name}`);
      const nav = page.getByRole("navigation", { name: "Main" });
      const labels = (await nav.getByRole("link").allTextContents()).map((t) => t.trim());
      expect(labels).toEqual(UX_NAVIGATION[role].filter((label) => BUILT_SECTIONS.includes(label)));
      expect(await page.getByTestId("signed-in-as").textContent()).toContain(user.name);
      expect(await page.locator("footer").textContent()).toContain("supports and does not replace the laboratory's licensed direction");
      await screenshot(page, `overview-${role}`);
      // Every section offered to the role opens for it (DESIGN.md: a page refuses only roles
      // that may not use it).
      const hrefs = await nav.getByRole("link").evaluateAll((links) => links.map((a) => a.getAttribute("href")));
      for (const href of hrefs) {
        const response = await page.goto(href!);
        expect({ href, status: response?.status() }).toEqual({ href, status: 200 });
      }
      await context.close();
    });
  }
});

describe("keeping people out", () => {
  it("sends an anonymous visitor to sign-in, and back after signing in", async () => {
    const { context, page } = await newPage(browser);
    await page.goto("/audit");
    await page.waitForURL(/\/sign-in\?callbackUrl=%2Faudit$/);
    expect(await page.locator("footer").textContent()).toContain("licensed direction");
    await screenshot(page, "sign-in");
    const director = demoUser("director");
    await signIn(page, director.email, director.password);
    await page.waitForURL("/audit");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Audit trail");
    await context.close();
  });

  it("refuses a clinician who opens the admin users page by its address", async () => {
    const { context, page } = await newPage(browser);
    const clinician = demoUser("clinician");
    await signIn(page, clinician.email, clinician.password);
    await page.waitForURL("/");
    const response = await page.goto("/admin/users");
    expect(response?.status()).toBe(403);
    expect(await page.getByTestId("forbidden").textContent()).toContain("Not available to your role");
    expect(await page.getByRole("table").count()).toBe(0);
    await screenshot(page, "forbidden-clinician");
    await context.close();
  });

  it("says plainly when the password is wrong, and stays on sign-in", async () => {
    const { context, page } = await newPage(browser);
    await signIn(page, demoUser("scientist").email, "not-the-password");
    const error = page.getByTestId("sign-in-error");
    await error.waitFor();
    expect(await error.textContent()).toBe("The e-mail or password is not right.");
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await context.close();
  });

  it("signs out: the session ends and pages send the person back to sign-in", async () => {
    const { context, page } = await newPage(browser);
    const scientist = demoUser("scientist");
    await signIn(page, scientist.email, scientist.password);
    await page.waitForURL("/");
    await page.getByTestId("signed-in-as").getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await page.goto("/account");
    await page.waitForURL(/\/sign-in\?callbackUrl=%2Faccount$/);
    await context.close();
  });
});
