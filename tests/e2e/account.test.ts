import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { createUser } from "@/db/queries/users";
import { testDatabase, uniqueEmail } from "../support/database";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

const { database, pool } = testDatabase();
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

describe("a clinician changes their own password", () => {
  it("refuses a wrong current password keeping what was typed, then changes it", async () => {
    const email = uniqueEmail("account");
    const first = "first-password-long";
    const second = "second-password-long";
    await createUser(database, { input: { email, name: "Ola Marchetti", role: "clinician", password: first }, actor: SYSTEM_ACTOR });

    const { context, page } = await newPage(browser);
    await signIn(page, email, first);
    await page.waitForURL("/");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Account" }).click();
    await page.waitForURL("/account");

    await page.getByLabel("Current password").fill("not-my-password");
    await page.getByLabel("New password", { exact: true }).fill(second);
    await page.getByLabel("New password again").fill(second);
    await page.getByRole("button", { name: "Change password" }).click();
    await page.getByRole("alert").filter({ hasText: "Your current password is not right; nothing was changed." }).waitFor();
    expect(await page.getByLabel("New password", { exact: true }).inputValue()).toBe(second);

    await page.getByLabel("Current password").fill(first);
    await page.getByRole("button", { name: "Change password" }).click();
    await page.getByRole("status").filter({ hasText: "Your password has been changed." }).waitFor();
    await screenshot(page, "account-password-changed");

    await page.getByTestId("signed-in-as").getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await signIn(page, email, first);
    await page.getByTestId("sign-in-error").waitFor();
    await signIn(page, email, second);
    await page.waitForURL("/");
    await context.close();
  });
});
