import type { Browser } from "playwright-core";
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

describe("the API page", () => {
  it("is reached from the sidebar by a signed-in clinician, shows copyable examples and links the OpenAPI document", async () => {
    const { context, page } = await newPage(browser);
    await context.grantPermissions(["clipboard-read", "clipboard-write"]);
    const clinician = demoUser("clinician");
    await signIn(page, clinician.email, clinician.password);
    await page.waitForURL("/");

    await page.getByTestId("signed-in-as").getByRole("link", { name: "API for laboratory systems" }).click();
    await page.waitForURL("/api-docs");
    await page.getByRole("heading", { level: 1, name: "API" }).waitFor();

    for (const title of ["Authenticate", "Score one value", "Score a batch", "Censored values", "Units", "FHIR R4", "Intervals in force", "Errors", "Limits"]) {
      await page.getByRole("heading", { level: 2, name: title }).waitFor();
    }

    const blocks = page.getByTestId("code-block");
    const texts = await blocks.allTextContents();
    // The examples as written in lib/api/examples.ts: the demo's potassium, a bearer key from the shell, the FHIR route.
    expect(texts.some((t) => t.includes('"$BELLWETHER_URL/api/v1/scores"') && t.includes('"analyte": "K"') && t.includes("Authorization: Bearer $BELLWETHER_KEY"))).toBe(true);
    expect(texts.some((t) => t.includes('"value": "<0.01"'))).toBe(true);
    expect(texts.some((t) => t.includes("/api/v1/fhir/Observation/\\$score") && t.includes('"resourceType": "Observation"'))).toBe(true);
    expect(texts.some((t) => t.includes("/api/v1/analytes/K/intervals"))).toBe(true);
    expect(texts.some((t) => t.startsWith('export BELLWETHER_URL="http://127.0.0.1:'))).toBe(true);

    await page.getByRole("button", { name: "Copy: Score one value (curl)" }).click();
    await page.getByText("Copied", { exact: true }).waitFor();
    const copied = await page.evaluate(() => navigator.clipboard.readText());
    expect(copied).toContain('"$BELLWETHER_URL/api/v1/scores"');
    expect(copied).toContain('"ageYears": 54');

    expect(await page.getByRole("link", { name: "OpenAPI 3.1 document (JSON)" }).getAttribute("href")).toBe("/api/v1/openapi.json");
    await screenshot(page, "api-docs");
    // UX.md: usable at 820 px (the sidebar becomes a top bar; code scrolls inside its block).
    await page.setViewportSize({ width: 820, height: 900 });
    await page.getByRole("heading", { level: 2, name: "Score a batch" }).scrollIntoViewIfNeeded();
    await screenshot(page, "api-docs-820");

    const document = await page.request.get("/api/v1/openapi.json");
    expect(document.status()).toBe(200);
    expect((await document.json()).openapi).toBe("3.1.0");
    await context.close();
  });
});
