import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { fetchWithKey } from "../support/lis";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

const { pool } = testDatabase();
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

/** Score-log rows as the scoring service writes them, for the usage view (flags from the issue: L/N/H). */
async function logScores(connectionId: string, flags: { flag: string; hoursAgo: number }[]) {
  const [glu] = (await pool.query("SELECT id FROM analytes WHERE code = 'GLU'")).rows;
  for (const { flag, hoursAgo } of flags) {
    await pool.query(
      `INSERT INTO score_log (scored_at, analyte_id, version_id, partition_id, value, flag, z, percentile, caller_kind, caller_id, channel)
       VALUES (now() - make_interval(hours => $1), $2, gen_random_uuid(), gen_random_uuid(), 5.1, $3, 0.1, 54, 'lis', $4, 'api')`,
      [hoursAgo, glu.id, flag, connectionId],
    );
  }
}

describe("an administrator manages LIS connections", () => {
  it("creates a connection, sees its key once, sets its rate, revokes it; the key then gets 401", async () => {
    const { context, page } = await newPage(browser);
    const admin = demoUser("admin");
    await signIn(page, admin.email, admin.password);
    await page.waitForURL("/");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "LIS connections" }).click();
    await page.waitForURL("/admin/lis-connections");

    const name = `Ward LIS e2e ${Date.now()}`;
    const form = page.getByRole("form", { name: "New LIS connection" });
    await form.getByLabel("Name").fill(name);
    await form.getByLabel("Contact e-mail").fill("not an address");
    await form.getByRole("button", { name: "Create connection and key" }).click();
    // The browser's own check stops an address without "@" first; the server's message covers the rest.
    expect(await page.getByTestId("new-key").count()).toBe(0);
    await form.getByLabel("Contact e-mail").fill("ward-lis@harrowmere.example");
    await form.getByLabel("Rate limit (requests a minute)").fill("20000000");
    await form.getByRole("button", { name: "Create connection and key" }).click();
    await page.getByRole("alert").filter({ hasText: "The rate limit is at most 10,000,000 requests a minute." }).waitFor();
    expect(await form.getByLabel("Name").inputValue()).toBe(name);
    await form.getByLabel("Rate limit (requests a minute)").fill("6000");
    await form.getByRole("button", { name: "Create connection and key" }).click();

    const notice = page.getByTestId("new-key");
    await notice.waitFor();
    const key = await page.getByTestId("new-key-value").inputValue();
    expect(key).toMatch(/^bwk_[A-Za-z0-9_-]{43}$/);
    expect(await notice.textContent()).toContain("It will not be shown again");
    await notice.getByRole("button", { name: "Copy key" }).click();
    await notice.getByText(/Copied to the clipboard\.|the key is selected/).waitFor();
    const row = page.getByTestId("lis-connections").getByRole("row").filter({ hasText: name });
    await row.waitFor();
    expect(await row.textContent()).toContain(`${key.slice(0, 12)}…`);
    expect(await row.textContent()).toContain("Never");
    await screenshot(page, "lis-connections-new-key");

    // The key works for the LIS.
    expect((await fetchWithKey(key, "/api/v1/analytes")).status).toBe(200);

    // Once dismissed, the key is nowhere on the page, nor after a reload.
    await notice.getByRole("button", { name: "I have stored the key" }).click();
    expect(await page.getByTestId("new-key").count()).toBe(0);
    expect(await page.content()).not.toContain(key);
    const [{ id }] = (await pool.query("SELECT id FROM lis_connections WHERE name = $1", [name])).rows;
    await logScores(id, [
      { flag: "N", hoursAgo: 1 },
      { flag: "N", hoursAgo: 2 },
      { flag: "H", hoursAgo: 3 },
      { flag: "L", hoursAgo: 48 },
    ]);
    await page.reload();
    expect(await page.content()).not.toContain(key);

    // The usage view: 3 scores in the last 24 hours (N 2, H 1), 4 in 7 days (L 1 more).
    const usage = page.getByTestId("lis-usage").getByRole("row").filter({ hasText: name });
    expect((await usage.textContent())?.replace(/\s+/g, " ")).toContain("3 (L 0 · N 2 · H 1)4 (L 1 · N 2 · H 1)");

    // The rate limit, changed in place.
    const rate = page.getByLabel(`Requests a minute for ${name}`);
    await rate.fill("120");
    await page.getByRole("form", { name: `Rate limit of ${name}` }).getByRole("button", { name: "Save" }).click();
    await page.getByRole("status").filter({ hasText: "Saved; in force at once." }).waitFor();
    expect((await pool.query("SELECT rate_per_minute FROM lis_connections WHERE id = $1", [id])).rows[0].rate_per_minute).toBe(120);

    // Revoking asks first; Cancel leaves the key working.
    await page.getByRole("button", { name: `Revoke ${name}` }).click();
    const confirm = page.getByRole("group", { name: `Confirm revoking ${name}` });
    await confirm.getByText("This cannot be undone").waitFor();
    await screenshot(page, "lis-connections-revoke-confirm");
    await confirm.getByRole("button", { name: "Cancel" }).click();
    expect((await fetchWithKey(key, "/api/v1/analytes")).status).toBe(200);

    await page.getByRole("button", { name: `Revoke ${name}` }).click();
    await page.getByRole("group", { name: `Confirm revoking ${name}` }).getByRole("button", { name: "Revoke the key" }).click();
    await row.getByText("Revoked", { exact: true }).waitFor();
    expect(await row.textContent()).toContain(`by ${admin.name}`);
    await screenshot(page, "lis-connections-revoked");

    const refused = await fetchWithKey(key, "/api/v1/analytes");
    expect(refused.status).toBe(401);
    expect((await refused.json()).detail).toBe("This API key has been revoked. Ask your Bellwether administrator for a new one.");

    await page.setViewportSize({ width: 820, height: 1000 });
    await screenshot(page, "lis-connections-820");
    await context.close();
  });

  it("is refused to every other role", async () => {
    for (const role of ["director", "scientist", "clinician"] as const) {
      const { context, page } = await newPage(browser);
      const user = demoUser(role);
      await signIn(page, user.email, user.password);
      await page.waitForURL("/");
      const response = await page.goto("/admin/lis-connections");
      expect({ role, status: response?.status() }).toEqual({ role, status: 403 });
      await context.close();
    }
  });
});
