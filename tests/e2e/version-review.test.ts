import fs from "node:fs";
import path from "node:path";
import ExcelJS from "exceljs";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, screenshot, screenshotsAtBothWidths, signIn } from "./support/browser";

const shots = (page: Page, name: string) => screenshotsAtBothWidths(page, `review-${name}`);

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const SHOTS = process.env.BELLWETHER_SCREENSHOT_DIR ?? path.join(process.cwd(), ".test-data", "screenshots");

async function signInAs(page: Page, role: Role) {
  const user = demoUser(role);
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
}

/** UX.md's two widths: the laptop (1280 px) and the narrow one (820 px). */
/** The demo's versions in a state, through the API the pages use. */
async function versionsIn(page: Page, state: string): Promise<{ id: string; number: number; analyte: { code: string } }[]> {
  const res = await page.request.get(`/api/v1/interval-versions?state=${state}`);
  expect(res.status()).toBe(200);
  return (await res.json()).items;
}

describe("a director reviews a version awaiting sign-off", () => {
  it("finds it in the sign-off queue and reads the evidence top to bottom, the signature panel last", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "director");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Sign-off queue" }).click();
    await page.waitForURL("/signoff");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Sign-off queue");
    // The demo seeds one version awaiting sign-off: alkaline phosphatase (DEVELOPERS.md, "The demo").
    const queue = page.getByTestId("signoff-queue");
    expect(await queue.locator("tbody tr").count()).toBeGreaterThanOrEqual(1);
    expect(await queue.textContent()).toContain("ALP");
    await shots(page, "signoff-queue");

    await queue.getByRole("link", { name: /Review version \d+ of ALP/ }).first().click();
    await page.waitForURL(/\/versions\/[0-9a-f-]{36}$/);
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toMatch(/^Version \d+ of ALP$/);
    expect(await page.getByTestId("version-state").textContent()).toBe("Awaiting sign-off");
    // The sections in UX.md's order, then the actions with the signature panel last.
    const order = await page.locator("section[id], [data-testid$='-panel']").evaluateAll((els) => els.map((e) => e.id || e.getAttribute("data-testid")));
    expect(order).toEqual(["changes", "individuals", "partitions", "estimates", "warnings", "return-panel", "signature-panel"]);
    expect(await page.getByTestId("comparison-table").textContent()).toContain("This version");
    expect(await page.getByTestId("flag-changes").textContent()).toMatch(/donors in the study/);
    // Beside the donors, the patient scores of the last 90 days re-flagged, in a sentence.
    expect(await page.getByTestId("recent-score-changes").textContent()).toMatch(/(Of [\d,]+ scores?|No patient scores were logged) in the last 90 days/);
    // The meaning is stated in words before the password is asked.
    const panel = page.getByTestId("signature-panel");
    expect(await panel.getByTestId("signature-meaning").textContent()).toBe("Approved for clinical use");
    const meaningY = (await panel.getByTestId("signature-meaning").boundingBox())!.y;
    const passwordY = (await panel.getByLabel("Password").boundingBox())!.y;
    expect(meaningY).toBeLessThan(passwordY);
    await shots(page, "version-awaiting");

    // The dossier downloads and opens in exceljs, with the director's donor rows.
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("dossier-link").click()]);
    const file = path.join(SHOTS, "review-dossier.xlsx");
    fs.mkdirSync(SHOTS, { recursive: true });
    await download.saveAs(file);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.readFile(file);
    expect(workbook.worksheets.map((s) => s.name)).toEqual([
      "Summary", "Signatures", "Partitions", "Methods", "Partition verdicts", "Exclusions", "Donor results", "Audit events",
    ]);

    // The printable record: no sidebar, printed on A4 and on Letter.
    await page.getByRole("link", { name: "Sign-off record" }).click();
    await page.waitForURL(/\/record$/);
    expect(await page.getByRole("navigation", { name: "Main" }).count()).toBe(0);
    expect(await page.getByTestId("signature-block").textContent()).toContain("SHA-256");
    await shots(page, "record");
    await page.emulateMedia({ media: "print" });
    await screenshot(page, "review-record-print-media");
    await page.emulateMedia({ media: "screen" });
    for (const format of ["A4", "Letter"] as const) {
      const pdf = await page.pdf({ format, preferCSSPageSize: true, printBackground: true });
      fs.writeFileSync(path.join(SHOTS, `review-record-${format}.pdf`), pdf);
      expect(pdf.subarray(0, 5).toString()).toBe("%PDF-");
    }
    await context.close();
  });

  it("shows a scientist a draft with Submit for sign-off and no signature panel", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "scientist");
    const [draft] = await versionsIn(page, "draft");
    await page.goto(`/versions/${draft.id}`);
    expect(await page.getByTestId("version-state").textContent()).toMatch(/^(Draft|Returned to draft)$/);
    expect(await page.getByTestId("submit-panel").count()).toBe(1);
    expect(await page.getByTestId("signature-panel").count()).toBe(0);
    await shots(page, "version-draft-scientist");
    await context.close();
  });

  it("keeps clinicians out of the review page and scientists out of the queue", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "scientist");
    expect((await page.goto("/signoff"))?.status()).toBe(403);
    await context.close();
    const clinician = await newPage(browser);
    await signInAs(clinician.page, "clinician");
    // The role is checked before the version is looked up, so any id will do.
    expect((await clinician.page.goto("/versions/00000000-0000-4000-8000-000000000000"))?.status()).toBe(403);
    await clinician.context.close();
  });
});
