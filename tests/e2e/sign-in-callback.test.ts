import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { BASE_URL, launchBrowser, newPage, screenshot, signIn } from "./support/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const HOSTILE = ["//evil.example", "/\\evil.example", "https://evil.example", "/%2F%2Fevil.example", "/\t/evil.example", "/.//evil.example"];

describe("a sign-in link with a callback to another site", () => {
  it("signs in and lands on the overview, never leaving Bellwether", async () => {
    const { context, page } = await newPage(browser);
    const hosts = new Set<string>();
    page.on("request", (request) => hosts.add(new URL(request.url()).host));
    const scientist = demoUser("scientist");

    await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(HOSTILE[0])}`);
    await signIn(page, scientist.email, scientist.password);
    await page.waitForURL(`${BASE_URL}/`);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe(`Welcome, ${scientist.name}`);
    await screenshot(page, "sign-in-hostile-callback");

    // Signed in already, the sign-in page itself sends the person on: to the overview as well.
    for (const value of HOSTILE) {
      await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(value)}`);
      await page.waitForURL(`${BASE_URL}/`);
      expect(new URL(page.url()).pathname, value).toBe("/");
    }
    expect([...hosts]).toEqual([new URL(BASE_URL).host]);
    await context.close();
  });
});
