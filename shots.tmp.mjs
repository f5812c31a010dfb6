import { chromium } from "playwright-core";
const [role, ...paths] = process.argv.slice(2);
const base = process.env.BASE ?? "http://127.0.0.1:3000";
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", headless: true, args: ["--no-sandbox", "--disable-gpu"] });
const ctx = await browser.newContext({ baseURL: base, viewport: { width: 1280, height: 800 } });
const page = await ctx.newPage();
const errors = [];
page.on("pageerror", (e) => errors.push(e.message));
page.on("console", (m) => { if (m.type() === "error") errors.push(m.text()); });
await page.goto("/sign-in");
await page.getByLabel("E-mail").fill(`${role}@harrowmere.example`);
await page.getByLabel("Password").fill(`bellwether-${role}-demo`);
await page.getByRole("button", { name: "Sign in" }).click();
await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
let i = 0;
for (const p of paths) {
  await page.goto(p);
  await page.waitForLoadState("networkidle");
  await page.waitForTimeout(1500);
  const name = `/tmp/try/shots/${role}-${i++}.png`;
  await page.screenshot({ path: name, fullPage: true });
  console.log(name, p, (await page.title()));
}
console.log("errors:", errors);
await browser.close();
