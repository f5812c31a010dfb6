/**
 * The bad-input corpus in the browser: SQL and HTML fragments typed into the new-study form and
 * uploaded as donor codes (tests/fixtures/bad-input/sql-html.csv) are stored and shown as text,
 * never as markup: no element they describe appears, no script they hold runs, no dialog opens.
 * A file refused whole shows the server's message.
 */
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { CORPUS } from "../support/bad-input";
import { launchBrowser, newPage, screenshot, signIn } from "./support/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const TITLE = `<img src=x onerror="window.__bwInjected=1">Glucose'); DROP TABLE studies;-- ${Date.now().toString(36)}`;
const CRITERIA = `<script>window.__bwInjected=2</script><b>bold?</b> & "quotes"`;
const CODES = ["Robert'); DROP TABLE donor_results;--", "' OR '1'='1", "<script>alert('bw')</script>", "<img src=x onerror=alert(1)>", "&lt;b&gt;&amp;"];

/** Whatever the fragments would have made if they had been read as markup. */
async function expectNothingInjected(page: Page, dialogs: string[]): Promise<void> {
  expect(await page.evaluate(() => (window as unknown as { __bwInjected?: number }).__bwInjected)).toBeUndefined();
  expect(await page.locator('main img[src="x"], main script:not([src]):has-text("bw")').count()).toBe(0);
  expect(await page.locator("main b", { hasText: "bold?" }).count()).toBe(0);
  expect(dialogs).toEqual([]);
}

describe("SQL and HTML fragments are stored and shown as text", () => {
  it("in a study's title and criteria typed in the form, and in uploaded donor codes", async () => {
    const { context, page } = await newPage(browser);
    const dialogs: string[] = [];
    page.on("dialog", (d) => {
      dialogs.push(d.message());
      void d.dismiss();
    });
    const user = demoUser("scientist");
    await signIn(page, user.email, user.password);
    await page.waitForURL("/");
    await page.goto("/studies");

    const form = page.getByRole("form", { name: "New study" });
    await form.getByLabel("Analyte").selectOption("GLU");
    await form.getByLabel("Title").fill(TITLE);
    await form.getByLabel("Reference individuals and exclusion criteria").fill(CRITERIA);
    await form.getByRole("button", { name: "Open the study" }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe(TITLE);
    expect(await page.getByText(CRITERIA, { exact: true }).count()).toBeGreaterThan(0);
    await expectNothingInjected(page, dialogs);

    // The donor codes of the corpus file, checked and committed through the upload panel.
    await page.locator("#donor-file").setInputFiles(path.join(CORPUS, "sql-html.csv"));
    await page.getByRole("button", { name: "Check the file" }).click();
    await page.getByRole("button", { name: "Commit 5 valid rows" }).click();
    const table = page.getByTestId("donor-results");
    for (const code of CODES) await table.getByText(code, { exact: true }).waitFor();
    await expectNothingInjected(page, dialogs);
    await screenshot(page, "bad-input-study");

    // The studies list shows the title as text too.
    await page.goto("/studies");
    await page.getByText(TITLE, { exact: true }).first().waitFor();
    await expectNothingInjected(page, dialogs);
    await context.close();
  });

  it("a file refused whole shows the server's message in the upload panel", async () => {
    const { context, page } = await newPage(browser);
    const user = demoUser("scientist");
    await signIn(page, user.email, user.password);
    await page.waitForURL("/");
    await page.goto("/studies");
    const form = page.getByRole("form", { name: "New study" });
    await form.getByLabel("Analyte").selectOption("GLU");
    await form.getByLabel("Title").fill(`Bad input refusal ${Date.now().toString(36)}`);
    await form.getByRole("button", { name: "Open the study" }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    await page.locator("#donor-file").setInputFiles(path.join(CORPUS, "control-character.csv"));
    await page
      .getByTestId("upload-refusal")
      .filter({ hasText: "line 3 of the file holds the control character U+0007, which CSV text does not contain" })
      .waitFor();
    await screenshot(page, "bad-input-refusal");
    await context.close();
  });
});
