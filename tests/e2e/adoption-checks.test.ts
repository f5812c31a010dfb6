import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { launchBrowser, newPage, screenshotsAtBothWidths, signIn } from "./support/browser";

const shots = screenshotsAtBothWidths;

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** 20 potassium values against 3.5–5.1, `below` under 3.5 and `above` over 5.1. */
function values(below: number, above: number): string[] {
  const x = Array.from({ length: 20 }, (_, i) => (3.6 + (1.4 * i) / 19).toFixed(2));
  for (let i = 0; i < below; i++) x[i] = (3.1 + i / 10).toFixed(1);
  for (let i = 0; i < above; i++) x[19 - i] = (5.4 + i / 10).toFixed(1);
  return x;
}

describe("a scientist verifies a manufacturer's potassium interval", () => {
  it("enters a check that needs a second set, uploads the second set, is accepted and drafts a version", async () => {
    const { context, page } = await newPage(browser);
    const user = demoUser("scientist");
    await signIn(page, user.email, user.password);
    await page.waitForURL("/");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Adoption checks" }).click();
    await page.waitForURL("/adoption-checks");
    expect(await page.getByRole("heading", { level: 1 }).textContent()).toBe("Adoption checks");

    const form = page.getByRole("form", { name: "New adoption check" });
    // A mistake first: 19 values. The form keeps what was typed and says what is wrong.
    await form.getByLabel("Analyte", { exact: true }).selectOption("K");
    await form.getByLabel("Lower limit (mmol/L)").fill("3.5");
    await form.getByLabel("Upper limit (mmol/L)").fill("5.1");
    await form.getByLabel("Source of the interval").fill("Manufacturer's insert, potassium reagent, lot E2E");
    await form.getByLabel(/Type or paste 20 values/).fill(values(2, 1).slice(1).join("\n"));
    await form.getByRole("button", { name: "Check the interval" }).click();
    await form.locator("#check-values-hint").filter({ hasText: "Give exactly 20 values." }).waitFor();
    expect(await form.getByLabel("Lower limit (mmol/L)").inputValue()).toBe("3.5");
    await shots(page, "adoption-form-error");

    // 20 values, 3 of them outside: a second set is needed.
    await form.getByLabel(/Type or paste 20 values/).fill(values(2, 1).join(", "));
    await form.getByRole("button", { name: "Check the interval" }).click();
    await page.waitForURL(/\/adoption-checks\/[0-9a-f-]{36}$/);
    const decision = page.getByTestId("decision-words");
    expect(await decision.textContent()).toBe(
      "3 of 20 fall outside: test 20 more local healthy donors. The interval is accepted if at most 2 of those fall outside.",
    );
    const first = page.getByTestId("first-set");
    expect(await first.textContent()).toContain("3 of 20 values (15.0%) fall outside 3.5–5.1 (2 below, 1 above)");
    // R: 1 - pbinom(2, 20, 0.05) = 0.0755 (METHODS.md §7.1).
    expect(await first.textContent()).toContain("P(X ≥ 3 | n = 20, p = 0.05)0.0755");
    expect(await first.textContent()).toContain("3 or more of 20 outside would happen with probability 0.0755 if the interval were right");
    await shots(page, "adoption-second-set-needed");

    // The second set, as a one-column CSV with a header: 1 outside.
    const second = page.getByRole("form", { name: "Second set" });
    await second.getByLabel(/one-column CSV or Excel file/).setInputFiles({
      name: "potassium-second-set.csv",
      mimeType: "text/csv",
      buffer: Buffer.from(["potassium", ...values(0, 1)].join("\n") + "\n"),
    });
    await second.getByRole("button", { name: "Check the second set" }).click();
    await page.getByTestId("second-set").waitFor();
    expect(await decision.textContent()).toBe("The interval 3.5–5.1 mmol/L is verified for the local population on the second set.");
    expect(await page.getByTestId("second-set").textContent()).toContain("1 of 20 values (5.0%) fall outside 3.5–5.1 (0 below, 1 above)");
    // R: (1 - pbinom(2, 20, 0.05))^2 = 0.0057 (METHODS.md §7.1).
    expect(await page.getByTestId("second-set").textContent()).toContain("A right interval would fail both sets with probability about 0.0057");
    await shots(page, "adoption-accepted");

    // Draft a version from the accepted check.
    const draft = page.getByRole("form", { name: "Draft a version" });
    expect(await draft.textContent()).toContain("the zlog scoring model");
    await draft.getByLabel("Note (optional)").fill("Adopted from the insert after local verification.");
    await draft.getByRole("button", { name: "Draft a version from this check" }).click();
    await draft.getByRole("status").filter({ hasText: /^Drafted version \d+ of K: submit it for sign-off when it is ready\.$/ }).waitFor();
    await page.getByTestId("drafted-versions").filter({ hasText: /Version \d+ of K · Draft/ }).waitFor();
    await shots(page, "adoption-drafted");

    // The list shows the check with both sets.
    await page.goto("/adoption-checks");
    await page.getByRole("row").filter({ hasText: "Manufacturer's insert, potassium reagent, lot E2E" }).filter({ hasText: "3/20, then 1/20" }).first().waitFor();
    await shots(page, "adoption-list");
    await context.close();
  });

  it("refuses the page to a clinician", async () => {
    const { context, page } = await newPage(browser);
    const user = demoUser("clinician");
    await signIn(page, user.email, user.password);
    await page.waitForURL("/");
    const response = await page.goto("/adoption-checks");
    expect(response?.status()).toBe(403);
    await context.close();
  });
});
