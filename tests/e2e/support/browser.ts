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

/**
 * Screenshots at both widths UX.md names, the laptop (1280 px) and the narrow window (820 px),
 * each after a moment for the layout and charts to settle; the page is left at 1280 px.
 */
export async function screenshotsAtBothWidths(page: Page, name: string): Promise<void> {
  await page.setViewportSize({ width: 1280, height: 800 });
  await page.waitForTimeout(300);
  await screenshot(page, `${name}-1280`);
  await page.setViewportSize({ width: 820, height: 1000 });
  await page.waitForTimeout(300);
  await screenshot(page, `${name}-820`);
  await page.setViewportSize({ width: 1280, height: 800 });
}

/**
 * Walks a journey in a fresh page: a screenshot `${name}-failure` when it fails, and the errors
 * the page reported (uncaught exceptions and console errors) returned, and printed, for the test
 * to assert on.
 */
export async function walkJourney(browser: Browser, name: string, walk: (page: Page) => Promise<void>): Promise<string[]> {
  const { context, page } = await newPage(browser);
  const pageErrors: string[] = [];
  page.on("pageerror", (e) => pageErrors.push(e.stack ?? e.message));
  page.on("console", (m) => {
    if (m.type() === "error") pageErrors.push(m.text());
  });
  try {
    await walk(page);
  } catch (e) {
    await screenshot(page, `${name}-failure`);
    throw e;
  } finally {
    if (pageErrors.length > 0) console.error(`errors in the page:\n${pageErrors.join("\n")}`);
    await context.close();
  }
  return pageErrors;
}
