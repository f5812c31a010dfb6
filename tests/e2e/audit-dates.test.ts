import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function filterByDates(page: Page, from: string, to: string) {
  await page.getByLabel("From").fill(from);
  await page.getByLabel("To").fill(to);
  await page.getByRole("button", { name: "Apply filters" }).click();
  await page.waitForURL(/\/audit\?/);
}

describe("the audit trail's date filters", () => {
  it("say what is wrong with a date that is not in the calendar, keeping what was typed", async () => {
    const { context, page } = await newPage(browser);
    const director = demoUser("director");
    await signIn(page, director.email, director.password);
    await page.waitForURL("/");
    await page.goto("/audit");

    await filterByDates(page, "2024-13-01", "2024-02-31");
    const alert = page.getByTestId("audit-date-error");
    await alert.waitFor();
    expect(await alert.locator("p").allTextContents()).toEqual([
      "2024-13-01 is not a date: there is no month 13.",
      "2024-02-31 is not a date: February 2024 has 29 days.",
      "Correct the dates above and apply the filters again to see events.",
    ]);
    expect(await page.getByLabel("From").inputValue()).toBe("2024-13-01");
    expect(await page.getByLabel("To").inputValue()).toBe("2024-02-31");
    expect(await page.getByRole("table").count()).toBe(0);
    await screenshot(page, "audit-dates-invalid");

    await filterByDates(page, "2024-03-02", "2024-03-01");
    expect(await page.getByTestId("audit-date-error").innerText()).toContain(
      "The end date 2024-03-01 is before the start date 2024-03-02; choose an end on or after the start.",
    );
    expect(await page.getByLabel("From").inputValue()).toBe("2024-03-02");

    // A real range shows events again: the demo was seeded when this test run began.
    const day = (offset: number) => {
      const d = new Date(Date.now() + offset * 86_400_000);
      const pad = (n: number) => String(n).padStart(2, "0");
      return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
    };
    await page.getByLabel("Action").selectOption("demo.seeded");
    await filterByDates(page, day(-1), day(1));
    expect(await page.getByTestId("audit-date-error").count()).toBe(0);
    await page.getByRole("table").getByText("Seeded the demo laboratory").waitFor();
    expect(await page.getByLabel("From").inputValue()).toBe(day(-1));
    await context.close();
  });

  it("answers an address with an impossible date with the page and its message, not an error", async () => {
    const { context, page } = await newPage(browser);
    const admin = demoUser("admin");
    await signIn(page, admin.email, admin.password);
    await page.waitForURL("/");
    const response = await page.goto("/audit?from=2023-02-29");
    expect(response?.status()).toBe(200);
    expect(await page.getByTestId("audit-date-error").innerText()).toContain("2023-02-29 is not a date: February 2023 has 28 days.");
    await context.close();
  });
});
