import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
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

const MAIL_URL = process.env.BELLWETHER_TEST_MAIL_URL;

/** Waits for the served app's mail job to hand the message to the fake provider (it runs every 2 s in tests). */
async function deliveredToFake(subject: string): Promise<{ to: string[]; subject: string }> {
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    const { data } = (await (await fetch(`${MAIL_URL}/emails`)).json()) as { data: { to: string[]; subject: string }[] };
    const found = data.find((m) => m.subject === subject);
    if (found) return found;
    await new Promise((r) => setTimeout(r, 500));
  }
  throw new Error(`the fake provider never received "${subject}"`);
}

describe("the outbox", () => {
  it("an administrator opens /admin/outbox and sees a queued message, its text, and that it was sent", async () => {
    const subject = `Sodium version 9 awaits sign-off (${Date.now()})`;
    await pool.query(
      `INSERT INTO outbox (kind, recipients, subject, text, created_at)
       VALUES ('version.submitted', '["director.one@lab.example", "director.two@lab.example"]', $1, $2, now() + interval '2 days')`,
      [subject, "Sodium version 9 was submitted by the demo scientist and awaits sign-off."],
    );
    const captured = await deliveredToFake(subject);
    expect(captured.to).toEqual(["director.one@lab.example", "director.two@lab.example"]);

    const { context, page } = await newPage(browser);
    const admin = demoUser("admin");
    await signIn(page, admin.email, admin.password);
    await page.waitForURL("/");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Outbox" }).click();
    await page.waitForURL("/admin/outbox");
    const row = page.getByTestId("outbox-row").filter({ hasText: subject });
    await row.waitFor();
    expect(await row.textContent()).toContain("director.one@lab.example, director.two@lab.example");
    expect(await row.textContent()).toContain("Sent");
    await row.getByRole("button", { name: "Show text" }).click();
    expect(await page.getByTestId("outbox-text").first().textContent()).toBe("Sodium version 9 was submitted by the demo scientist and awaits sign-off.");
    await screenshot(page, "outbox-admin");
    await context.close();
  });

  it("a director's overview lists the reviews coming due, in words", async () => {
    const { context, page } = await newPage(browser);
    const director = demoUser("director");
    await signIn(page, director.email, director.password);
    await page.waitForURL("/");
    await page.getByRole("heading", { name: "Reviews coming due" }).waitFor();
    const due = await pool.query(
      `SELECT v.id, coalesce(v.review_by, v.effective_from + make_interval(months => a.review_months)) < now() AS overdue
         FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id
        WHERE v.state = 'in_force' AND coalesce(v.review_by, v.effective_from + make_interval(months => a.review_months)) <= now() + interval '60 days'`,
    );
    if (due.rows.length === 0) {
      await page.getByTestId("reviews-due-empty").waitFor();
    } else {
      const links = await page.getByTestId("reviews-due").getByRole("link").evaluateAll((as) => as.map((a) => a.getAttribute("href")));
      expect(links.sort()).toEqual(due.rows.map((r) => `/versions/${r.id}`).sort());
      if (due.rows.some((r) => r.overdue)) expect(await page.getByTestId("reviews-due").textContent()).toContain("overdue by");
    }
    await screenshot(page, "overview-reviews-due");
    await context.close();
  });
});
