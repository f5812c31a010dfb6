import { spawnSync } from "node:child_process";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { createUser } from "@/db/queries/users";
import { testDatabase, uniqueEmail } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, launchBrowser, newPage, screenshot, signIn } from "./support/browser";

const { database, pool } = testDatabase();
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

const REQUIRED =
  "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.";

function rowOf(page: Page, email: string) {
  return page.getByRole("row").filter({ hasText: email });
}

async function choosePassword(page: Page, given: string, chosen: string) {
  await page.getByLabel("Password you were given").fill(given);
  await page.getByLabel("New password", { exact: true }).fill(chosen);
  await page.getByLabel("New password again").fill(chosen);
  await page.getByRole("button", { name: "Change password" }).click();
}

describe("a password an administrator sets", () => {
  it("ends the person's open session, and at the next sign-in they must choose their own before anything else", async () => {
    const email = uniqueEmail("reset-e2e");
    await createUser(database, { input: { email, name: "Lior Ashdown", role: "clinician", password: "lior-own-password" }, actor: SYSTEM_ACTOR });
    const person = await newPage(browser);
    await signIn(person.page, email, "lior-own-password");
    await person.page.waitForURL("/");

    const admin = await newPage(browser);
    await signIn(admin.page, demoUser("admin").email, demoUser("admin").password);
    await admin.page.waitForURL("/");
    await admin.page.goto("/admin/users");
    await rowOf(admin.page, email).getByRole("button", { name: `Set password for ${email}` }).click();
    await rowOf(admin.page, email).getByLabel(`New password for ${email}`).fill("given-by-admin-123");
    await rowOf(admin.page, email).getByRole("button", { name: "Set", exact: true }).click();
    await admin.page
      .getByRole("status")
      .filter({ hasText: "New password set and the person's sessions ended. Give it to them through a safe channel; they must change it at the next sign-in." })
      .waitFor();
    await screenshot(admin.page, "admin-set-password");

    await person.page.goto("/account");
    await person.page.waitForURL(`${BASE_URL}/sign-in`);
    await signIn(person.page, email, "given-by-admin-123");
    await person.page.waitForURL("/change-password");
    expect(await person.page.getByRole("heading", { level: 1 }).textContent()).toBe("Choose your own password");
    expect(await person.page.getByTestId("password-change-required").textContent()).toBe(
      "Lior Ashdown, an administrator set the password you signed in with. Choose your own before you go on: until then Bellwether opens nothing else.",
    );
    await screenshot(person.page, "password-change-required");

    // Pages lead back here, and the API refuses with the reason.
    await person.page.goto("/account");
    await person.page.waitForURL("/change-password");
    const api = await person.page.request.get("/api/v1/me");
    expect(api.status()).toBe(403);
    expect((await api.json()).detail).toBe(REQUIRED);

    await choosePassword(person.page, "wrong-given-password", "lior-chosen-password");
    await person.page.getByRole("alert").filter({ hasText: "Your current password is not right; nothing was changed." }).waitFor();
    await choosePassword(person.page, "given-by-admin-123", "lior-chosen-password");
    await person.page.waitForURL(`${BASE_URL}/`);
    expect(await person.page.getByRole("heading", { level: 1 }).textContent()).toBe("Welcome, Lior Ashdown");
    await person.page.goto("/account");
    expect(await person.page.getByRole("heading", { level: 1 }).textContent()).toBe("Account");
    await screenshot(person.page, "password-chosen-account");

    await person.context.close();
    await admin.context.close();
  });
});

describe("changing one's own password", () => {
  it("keeps the session it was changed in and signs the others out", async () => {
    const email = uniqueEmail("own-e2e");
    await createUser(database, { input: { email, name: "Tamsin Okafor", role: "scientist", password: "tamsin-first-pass" }, actor: SYSTEM_ACTOR });
    const here = await newPage(browser);
    const elsewhere = await newPage(browser);
    for (const { page } of [here, elsewhere]) {
      await signIn(page, email, "tamsin-first-pass");
      await page.waitForURL("/");
    }

    await here.page.goto("/account");
    await here.page.getByLabel("Current password").fill("tamsin-first-pass");
    await here.page.getByLabel("New password", { exact: true }).fill("tamsin-second-pass");
    await here.page.getByLabel("New password again").fill("tamsin-second-pass");
    await here.page.getByRole("button", { name: "Change password" }).click();
    await here.page.getByRole("status").filter({ hasText: "Your password has been changed. Any other session of yours has been signed out." }).waitFor();
    await screenshot(here.page, "own-password-changed");

    await here.page.goto("/account");
    expect(new URL(here.page.url()).pathname).toBe("/account");
    expect(await here.page.getByTestId("signed-in-as").textContent()).toContain("Tamsin Okafor");

    await elsewhere.page.goto("/account");
    await elsewhere.page.waitForURL(`${BASE_URL}/sign-in`);
    await here.context.close();
    await elsewhere.context.close();
  });
});

describe("the first administrator of a real installation", () => {
  it("is made by create-admin, signs in with the one-time password and must choose their own", async () => {
    const email = uniqueEmail("first-admin-e2e");
    const root = path.resolve(__dirname, "..", "..");
    const run = spawnSync(
      path.join(root, "node_modules", ".bin", "tsx"),
      ["--conditions=react-server", path.join(root, "scripts", "create-admin.ts"), "--email", email, "--name", "Noemi Brackwater"],
      { cwd: root, encoding: "utf8", env: process.env },
    );
    expect(run.status).toBe(0);
    const password = /One-time password, shown only now: (\S+)/.exec(run.stdout)?.[1];
    expect(password).toBeDefined();

    const { context, page } = await newPage(browser);
    await signIn(page, email, password!);
    await page.waitForURL("/change-password");
    await page.goto("/admin/users");
    await page.waitForURL("/change-password");
    await choosePassword(page, password!, "noemi-own-admin-password");
    await page.waitForURL(`${BASE_URL}/`);
    const labels = (await page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents()).map((t) => t.trim());
    expect(labels).toEqual(["Overview", "Users", "LIS connections", "Outbox", "Audit trail", "Intervals", "Score", "Account"]);
    await screenshot(page, "first-admin-overview");
    await context.close();
  });
});
