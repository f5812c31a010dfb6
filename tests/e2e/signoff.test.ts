import fs from "node:fs";
import path from "node:path";
import ExcelJS from "exceljs";
import type { APIRequestContext, Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "../support/demo-users";
import { donorCsv, generatedRows } from "../support/studies";
import { launchBrowser, newPage, screenshot, screenshotsAtBothWidths, signIn } from "./support/browser";

const shots = (page: Page, name: string) => screenshotsAtBothWidths(page, `signoff-${name}`);

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const SHOTS = process.env.BELLWETHER_SCREENSHOT_DIR ?? path.join(process.cwd(), ".test-data", "screenshots");

async function signedIn(role: Role): Promise<Page> {
  const { page } = await newPage(browser);
  const user = demoUser(role);
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
  return page;
}

/** UX.md's two widths: the laptop (1280 px) and the narrow one (820 px). */
type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

async function json(res: Awaited<ReturnType<APIRequestContext["get"]>>, status: number): Promise<Doc> {
  const body = (await res.json()) as Doc;
  expect(res.status(), JSON.stringify(body)).toBe(status);
  return body;
}

/**
 * An analyte of its own with a study of 120 donors and one estimate, through the API as the
 * signed-in user, so that signing its version puts nothing of the demo's out of force.
 */
async function analyteWithEstimate(request: APIRequestContext): Promise<{ code: string; studyId: string; estimateId: string }> {
  const code = `SO${Date.now().toString(36).toUpperCase()}`.slice(0, 16);
  await json(await request.post("/api/v1/analytes", { data: { code, name: "Sign-off analyte", unit: "mmol/L", decimals: 2 } }), 201);
  const study = await json(await request.post("/api/v1/studies", { data: { analyte: code, title: `Sign-off study ${code}`, method: "Method A", specimen: "serum" } }), 201);
  const upload = await json(
    await request.post(`/api/v1/studies/${study.id}/uploads`, {
      multipart: { file: { name: "donors.csv", mimeType: "text/csv", buffer: Buffer.from(donorCsv(generatedRows(120, 77))) } },
    }),
    201,
  );
  await json(await request.post(`/api/v1/studies/${study.id}/uploads/${upload.id}/commit`), 200);
  const estimate = await json(await request.post(`/api/v1/studies/${study.id}/estimates`, { data: { outliers: "none", seed: 1 } }), 201);
  return { code, studyId: study.id, estimateId: estimate.id };
}

describe("a version from draft to in force through the pages", () => {
  it("a scientist submits, a director returns it with a comment, the scientist revises and resubmits, the director signs", async () => {
    const scientist = await signedIn("scientist");
    const director = await signedIn("director");
    const { code, studyId, estimateId } = await analyteWithEstimate(scientist.request);
    const draft = await json(
      await scientist.request.post("/api/v1/interval-versions", { data: { analyte: code, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] } }),
      201,
    );

    // 1. The scientist submits the draft from its page.
    await scientist.goto(`/versions/${draft.id}`);
    expect(await scientist.getByTestId("version-state").textContent()).toBe("Draft");
    await shots(scientist, "1-draft");
    await scientist.getByRole("button", { name: "Submit for sign-off" }).click();
    await scientist.getByTestId("version-state").filter({ hasText: "Awaiting sign-off" }).waitFor();
    expect(await scientist.getByTestId("signature-panel").count()).toBe(0);
    await shots(scientist, "2-submitted");

    // 2. The director finds it in the queue and returns it with a comment.
    await director.goto("/signoff");
    await director.getByRole("link", { name: `Review version ${draft.number} of ${code}` }).click();
    await director.waitForURL(`/versions/${draft.id}`);
    await shots(director, "3-director-review");
    const returnPanel = director.getByTestId("return-panel");
    await returnPanel.getByLabel("Comment for the author (required)").fill("State the collection period and the specimen handling.");
    await returnPanel.getByRole("button", { name: "Return to draft" }).click();
    await director.getByTestId("version-state").filter({ hasText: "Returned to draft" }).waitFor();
    expect(await director.getByTestId("return-comment").textContent()).toContain("State the collection period and the specimen handling.");
    await shots(director, "4-returned");

    // 3. The scientist reads the comment, revises the draft and submits it again.
    await scientist.reload();
    expect(await scientist.getByTestId("return-comment").textContent()).toContain("State the collection period");
    await json(await scientist.request.patch(`/api/v1/interval-versions/${draft.id}`, { data: { note: "Collected 2026-01 to 2026-03; serum separated within 2 h." } }), 200);
    await scientist.reload();
    await scientist.getByRole("button", { name: "Submit for sign-off" }).click();
    await scientist.getByTestId("version-state").filter({ hasText: "Awaiting sign-off" }).waitFor();
    await shots(scientist, "5-resubmitted");

    // 4. The director signs: the meaning in words, then e-mail (first signing of the session) and password.
    await director.reload();
    const panel = director.getByTestId("signature-panel");
    expect(await panel.getByTestId("signature-meaning").textContent()).toBe("Approved for clinical use");
    await panel.getByLabel("Password").fill("not the password");
    if (await panel.getByLabel("E-mail").count()) await panel.getByLabel("E-mail").fill(demoUser("director").email);
    await panel.getByRole("button", { name: "Sign: approved for clinical use" }).click();
    await panel.getByRole("alert").waitFor();
    await shots(director, "6-wrong-password");
    await panel.getByLabel("Password").fill(demoUser("director").password);
    if (await panel.getByLabel("E-mail").count()) await panel.getByLabel("E-mail").fill(demoUser("director").email);
    await panel.getByRole("button", { name: "Sign: approved for clinical use" }).click();
    await director.getByTestId("version-state").filter({ hasText: "In force" }).waitFor();
    const signatures = await director.getByTestId("signatures").textContent();
    expect(signatures).toContain(demoUser("director").name);
    expect(signatures).toContain("Approved for clinical use");
    await shots(director, "7-in-force");

    // 5. The dossier downloads and opens in exceljs with the signature block.
    const [download] = await Promise.all([director.waitForEvent("download"), director.getByTestId("dossier-link").click()]);
    const file = path.join(SHOTS, "signoff-dossier.xlsx");
    fs.mkdirSync(SHOTS, { recursive: true });
    await download.saveAs(file);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.readFile(file);
    const signatureRows: unknown[][] = [];
    workbook.getWorksheet("Signatures")!.eachRow((row) => signatureRows.push((row.values as unknown[]).slice(1)));
    expect(signatureRows[1][0]).toBe(demoUser("director").name);
    expect(signatureRows[1][2]).toBe("Approved for clinical use");

    // 6. The printed record carries the signature block.
    await director.goto(`/versions/${draft.id}/record`);
    expect(await director.getByTestId("signature-block").textContent()).toContain(demoUser("director").name);
    await director.emulateMedia({ media: "print" });
    await screenshot(director, "signoff-8-record-print");
    for (const format of ["A4", "Letter"] as const) {
      fs.writeFileSync(path.join(SHOTS, `signoff-record-${format}.pdf`), await director.pdf({ format, preferCSSPageSize: true, printBackground: true }));
    }
    await scientist.context().close();
    await director.context().close();
  });

  it("the author cannot sign: a director who drafted sees no signature panel, and the API refuses 403", async () => {
    const director = await signedIn("director");
    const { code, studyId, estimateId } = await analyteWithEstimate(director.request);
    const draft = await json(
      await director.request.post("/api/v1/interval-versions", { data: { analyte: code, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] } }),
      201,
    );
    await json(await director.request.post(`/api/v1/interval-versions/${draft.id}/submit`), 200);
    await director.goto(`/versions/${draft.id}`);
    expect(await director.getByTestId("version-state").textContent()).toBe("Awaiting sign-off");
    expect(await director.getByTestId("signature-panel").count()).toBe(0);
    expect(await director.getByTestId("return-panel").count()).toBe(0);
    expect(await director.getByTestId("duty-rule").textContent()).toContain("another director must sign it off or return it");
    await shots(director, "9-author-director");
    const refused = await director.request.post(`/api/v1/interval-versions/${draft.id}/sign`, {
      data: { password: demoUser("director").password, email: demoUser("director").email, meaning: "approved_for_clinical_use" },
    });
    expect(refused.status()).toBe(403);
    expect(refused.headers()["content-type"]).toBe("application/problem+json");
    await director.context().close();
  });
});
