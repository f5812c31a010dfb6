import type { Browser, Page } from "playwright-core";
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

async function signInAs(page: Page, role: "admin" | "director") {
  const user = demoUser(role);
  await signIn(page, user.email, user.password);
  await page.waitForURL("/");
}

function rowOf(page: Page, email: string) {
  return page.getByRole("row").filter({ hasText: email });
}

describe("an administrator manages users", () => {
  const email = `e2e.${Date.now()}@harrowmere.example`;
  const password = "a-long-first-password";

  it("creates a user, changes the role, and the audit trail records both", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "admin");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Users" }).click();
    await page.waitForURL("/admin/users");

    const form = page.getByRole("form", { name: "New user" });
    await form.getByLabel("Full name").fill("Noor Castellan");
    await form.getByLabel("E-mail").fill(email);
    await form.getByLabel("Role").selectOption("clinician");
    await form.getByLabel("Initial password").fill("short");
    await form.getByRole("button", { name: "Create user" }).click();
    await page.getByText("At least 12 characters.").waitFor();
    expect(await rowOf(page, email).count()).toBe(0);

    await form.getByLabel("Initial password").fill(password);
    await form.getByRole("button", { name: "Create user" }).click();
    await page.getByRole("status").filter({ hasText: `Created Noor Castellan (${email}) as clinician.` }).waitFor();
    await rowOf(page, email).waitFor();

    await rowOf(page, email).getByLabel(`Role for ${email}`).selectOption("scientist");
    // Listening starts before the click: an answer that comes back quickly is not missed.
    const saved = page.waitForResponse((r) => r.request().method() === "POST" && r.url().includes("/admin/users"));
    await rowOf(page, email).getByRole("button", { name: "Save" }).click();
    await saved;
    await page.reload();
    expect(await rowOf(page, email).getByLabel(`Role for ${email}`).inputValue()).toBe("scientist");
    await screenshot(page, "admin-users");

    await page.goto(`/audit?text=${encodeURIComponent(email)}`);
    const table = page.getByRole("table");
    await table.getByText(`Changed the role of ${email} from clinician to scientist`).waitFor();
    await table.getByText(`Created Noor Castellan <${email}> as clinician`).waitFor();
    await screenshot(page, "audit-trail");
    await context.close();
  });

  it("deactivates the user: the open session stops working and sign-in is refused", async () => {
    const userSide = await newPage(browser);
    await signIn(userSide.page, email, password);
    // The administrator chose the password, so the person is first asked for their own.
    await userSide.page.waitForURL("/change-password");

    const { context, page } = await newPage(browser);
    await signInAs(page, "admin");
    await page.goto("/admin/users");
    await rowOf(page, email).getByRole("button", { name: `Deactivate ${email}` }).click();
    await rowOf(page, email).getByText("Deactivated").waitFor();

    await userSide.page.goto("/account");
    await userSide.page.waitForURL(/\/sign-in/);
    await signIn(userSide.page, email, password);
    const error = userSide.page.getByTestId("sign-in-error");
    await error.waitFor();
    expect(await error.textContent()).toBe("This account has been deactivated. Ask your administrator.");
    await userSide.context.close();
    await context.close();
  });

  it("refuses to let the administrator deactivate their own account", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "admin");
    await page.goto("/admin/users");
    const self = rowOf(page, demoUser("admin").email);
    expect(await self.getByText("(you)").count()).toBe(1);
    expect(await self.getByRole("button", { name: /Deactivate/ }).count()).toBe(0);
    await context.close();
  });
});

describe("repeated failed sign-ins", () => {
  // scripts/run-tests.ts: 3 free failures per e-mail and address, then 30 seconds, doubling.
  async function pageAt(address: string) {
    const context = await browser.newContext({ baseURL: BASE_URL, viewport: { width: 1280, height: 800 }, extraHTTPHeaders: { "x-forwarded-for": address } });
    return { context, page: await context.newPage() };
  }

  it("make that e-mail wait at that address, saying how long, while the person signs in from elsewhere", async () => {
    const target = demoUser("clinician");
    const attacker = await pageAt("192.0.2.44");
    const failOnce = async (password: string) => {
      await signIn(attacker.page, target.email, password);
      // The button reads "Signing in…" until the answer is shown.
      await attacker.page.getByRole("button", { name: "Sign in", exact: true }).waitFor();
      return attacker.page.getByTestId("sign-in-error").textContent();
    };
    for (let i = 0; i < 3; i++) expect(await failOnce(`wrong-${i}`)).toBe("The e-mail or password is not right.");
    expect(await failOnce("wrong-3")).toBe("Too many failed sign-ins for this e-mail from your address. Wait 30 seconds before trying again.");
    await screenshot(attacker.page, "sign-in-wait");

    const person = await pageAt("203.0.113.15");
    await signIn(person.page, target.email, target.password);
    await person.page.waitForURL("/");
    await attacker.context.close();
    await person.context.close();
  });
});

describe("the director reads the audit trail", () => {
  it("filters by action", async () => {
    const { context, page } = await newPage(browser);
    await signInAs(page, "director");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Audit trail" }).click();
    await page.waitForURL("/audit");
    await page.getByLabel("Action").selectOption("demo.seeded");
    await page.getByRole("button", { name: "Apply filters" }).click();
    await page.waitForURL(/action=demo\.seeded/);
    const rows = page.getByRole("table").getByRole("row");
    expect(await rows.count()).toBe(2); // header + the one seeding event
    expect(await rows.nth(1).textContent()).toContain("Seeded the demo laboratory");
    await context.close();
  });
});
