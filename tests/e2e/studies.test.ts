import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, screenshot, screenshotsAtBothWidths, signIn } from "./support/browser";

const shots = screenshotsAtBothWidths;

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const EXAMPLES = path.join(process.cwd(), "public", "examples");

async function signInAs(page: Page, role: Role) {
  const user = demoUser(role);
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
}

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).textContent())?.trim();

describe("a scientist opens a study and loads its donor results", () => {
  const title = `Fasting glucose, healthy adults ${Date.now().toString(36)}`;

  it("opens the study, maps the example workbook's columns, checks, commits and pages through the donors; then closes it", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "scientist");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Studies" }).click();
    await page.waitForURL("/studies");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Studies");
    await shots(page, "studies-list");

    // Open the study: the form sends the scientist to it.
    const form = page.getByRole("form", { name: "New study" });
    await form.getByRole("button", { name: "Open the study" }).click();
    await form.locator("#study-analyte-error").filter({ hasText: "Choose the analyte the study is for." }).waitFor();
    await form.getByLabel("Analyte").selectOption("GLU");
    await form.getByLabel("Title").fill(title);
    await form.getByLabel("Method and instrument").fill("Hexokinase, chemistry analyser 2");
    await form.getByLabel("Reference individuals and exclusion criteria").fill("Fasting adults 18-70; excluded: diabetes, pregnancy, acute illness.");
    await form.getByLabel("Collected from").fill("2026-01-05");
    await form.getByLabel("Collected to").fill("2026-03-15");
    await form.getByRole("button", { name: "Open the study" }).click();
    await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
    const studyId = page.url().split("/").at(-1)!;
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe(title);
    expect(await text(page, "count-donor-results")).toBe("0");
    // The sections in the order of the work, each with its anchor.
    expect(await page.locator("main section[id]").evaluateAll((s) => s.map((e) => e.id))).toEqual([
      "donor-results",
      "screening",
      "partitions",
      "estimates",
      "draft",
    ]);
    expect(await text(page, "donor-results-done")).toBe("No donor results stored yet.");
    await page.getByTestId("donor-results-empty").waitFor();
    await shots(page, "study-new");

    // The workbook's headers are a laboratory export's: all but the value column are guessed.
    await page.locator("#donor-file").setInputFiles(path.join(EXAMPLES, "glucose-donors-other-headers.xlsx"));
    await page.getByTestId("preview-summary").filter({ hasText: "not the template's" }).waitFor();
    expect(await text(page, "mapping-gap")).toBe("Choose the file's column for value.");
    expect(await page.getByRole("button", { name: "Check the file" }).isDisabled()).toBe(true);
    expect(await page.locator("#map-donor_code").inputValue()).toBe("Sample ID");
    expect(await page.locator("#upload-sheet").inputValue()).toBe("Glucose donors");
    await shots(page, "study-mapping");

    await page.locator("#map-value").selectOption("Fasting glucose");
    expect(await text(page, "mapping-gap")).toBe("Checking stores nothing yet: you will see the report, then commit or cancel.");
    expect(await page.getByTestId("mapping-preview").locator("thead").textContent()).toContain("from “Fasting glucose”");
    await shots(page, "study-mapping-fixed");

    await page.getByRole("button", { name: "Check the file" }).click();
    await page.getByTestId("validation-report").waitFor();
    // scripts/examples.ts writes 120 invented donors, every row valid.
    expect([await text(page, "report-total"), await text(page, "report-valid"), await text(page, "report-invalid")]).toEqual(["120", "120", "0"]);
    await shots(page, "study-report");

    await page.getByRole("button", { name: "Commit 120 valid rows" }).click();
    await page.getByTestId("upload-notice").filter({ hasText: "Stored 120 donor results from glucose-donors-other-headers.xlsx." }).waitFor();
    await expect.poll(() => text(page, "count-donor-results")).toBe("120");
    await expect.poll(() => text(page, "donor-results-range")).toBe("1–25 of 120 donor results");

    // The file with problems: the report lists each with its reason; its valid rows are committed.
    await page.locator("#donor-file").setInputFiles(path.join(EXAMPLES, "glucose-donors-with-problems.csv"));
    await page.getByTestId("preview-summary").filter({ hasText: "The file's headers are the template's." }).waitFor();
    await page.getByRole("button", { name: "Check the file" }).click();
    await page.getByTestId("validation-report").waitFor();
    expect([await text(page, "report-total"), await text(page, "report-valid"), await text(page, "report-invalid")]).toEqual(["30", "23", "7"]);
    const problems = await page.getByTestId("report-problems").locator("tbody tr").allTextContents();
    expect(problems).toEqual([
      '3valuevalue "n/a" is not a number',
      '9donor_codedonor code "PX0009" appears in rows 9 and 10',
      '10donor_codedonor code "PX0009" appears in rows 9 and 10',
      "13sexsex is missing",
      "16age_yearsage_years 212 is over 120 years",
      "19unitU/L cannot be converted to mmol/L: they measure different kinds of quantity.",
      expect.stringMatching(/^22value/),
    ]);
    await shots(page, "study-report-problems");
    await page.getByRole("button", { name: "Commit 23 valid rows" }).click();
    await expect.poll(() => text(page, "count-donor-results")).toBe("143");

    // A third file, cancelled: nothing stored.
    await page.locator("#donor-file").setInputFiles(path.join(EXAMPLES, "glucose-donors.csv"));
    await page.getByRole("button", { name: "Check the file" }).click();
    await page.getByRole("button", { name: "Cancel the upload" }).click();
    await page.getByTestId("upload-notice").filter({ hasText: "Cancelled the upload of glucose-donors.csv; nothing was stored." }).waitFor();
    expect(await text(page, "count-donor-results")).toBe("143");

    // The donor table pages, sorts and filters on the server.
    const table = page.getByTestId("donor-results");
    await expect.poll(() => text(page, "donor-results-range")).toBe("1–25 of 143 donor results");
    await table.getByRole("button", { name: "Next page" }).click();
    await expect.poll(() => text(page, "donor-results-range")).toBe("26–50 of 143 donor results");
    await table.getByRole("button", { name: /^Value/ }).click();
    await expect.poll(() => text(page, "donor-results-range")).toBe("1–25 of 143 donor results");
    // The censored value of the problems file sorts by its limit, shown as written.
    await expect.poll(() => table.locator("tbody tr").first().locator("td").nth(5).textContent()).toBe("<0.5");

    const expected = await page.request.get(`/api/v1/studies/${studyId}/donor-results?sex=F&ageFrom=30&ageTo=50&pageSize=1`);
    const femaleTotal = (await expected.json()).total as number;
    await table.getByLabel("Sex").selectOption("F");
    await table.getByLabel("Age from").fill("30");
    await table.getByLabel("Age to").fill("50");
    await table.getByRole("button", { name: "Apply filters" }).click();
    await expect.poll(() => text(page, "donor-results-range")).toBe(`1–${Math.min(25, femaleTotal)} of ${femaleTotal} donor results matching the filters`);
    const sexes = await table.locator("tbody tr td:nth-child(3)").allTextContents();
    expect(new Set(sexes)).toEqual(new Set(["F"]));
    await shots(page, "study-donor-results");

    await page.getByRole("button", { name: "Close the study…" }).click();
    await page.getByRole("dialog").getByRole("button", { name: "Close the study" }).click();
    await page.getByTestId("study-closed").waitFor();
    expect(await page.getByTestId("upload-panel").count()).toBe(0);
    expect(await text(page, "donor-results-next")).toBe("The study is closed: no more files can be uploaded.");
    await shots(page, "study-closed");

    await page.goto("/studies");
    const row = page.getByRole("row").filter({ hasText: title });
    expect(await row.textContent()).toContain("Closed: no more changes");
    expect(await row.textContent()).toContain("143");
    await shots(page, "studies-list-filled");
    await context.close();

    // Roles without studies get the forbidden page, on the list and on the study itself.
    for (const role of ["clinician", "admin"] as const) {
      const other = await newPage(browser);
      await signInAs(other.page, role);
      for (const href of ["/studies", `/studies/${studyId}`]) {
        const response = await other.page.goto(href);
        expect({ role, href, status: response?.status() }).toEqual({ role, href, status: 403 });
        expect(await other.page.getByTestId("forbidden").textContent()).toContain("Not available to your role");
        expect(await other.page.getByRole("table").count()).toBe(0);
      }
      if (role === "clinician") await screenshot(other.page, "study-forbidden-clinician");
      await other.context.close();
    }
  }, 120_000);
});
