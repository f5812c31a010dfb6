import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

/** The app served by scripts/run-tests.ts. */
export const BASE_URL = process.env.BELLWETHER_BASE_URL ?? "http://127.0.0.1:3100";

/**
 * Debian's Chromium, headless, with the flags that keep it off the (closed) network. Playwright
 * gives each launch a fresh, empty profile.
 */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
}

export async function newPage(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ baseURL: BASE_URL, viewport: { width: 1280, height: 800 } });
  const page = await context.newPage();
  return { context, page };
}

/** Signs in on the sign-in page, opening it first unless the browser is already there. */
export async function signIn(page: Page, email: string, password: string): Promise<void> {
  if (!page.url().includes("/sign-in")) await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

/** Saves a screenshot for people to look at (kept in .test-data/screenshots). */
export async function screenshot(page: Page, name: string): Promise<void> {
  const dir = process.env.BELLWETHER_SCREENSHOT_DIR ?? path.join(process.cwd(), ".test-data", "screenshots");
  fs.mkdirSync(dir, { recursive: true });
  await page.screenshot({ path: path.join(dir, `${name}.png`), fullPage: true });
}
