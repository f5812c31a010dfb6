import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const AXE = createRequire(import.meta.url).resolve("axe-core/axe.min.js");

/**
 * The WCAG 2.1 A and AA violations axe-core finds on the page as it stands (UX.md, Layout: "no
 * WCAG 2.1 AA violation that axe-core reports"), each as "rule: the elements it found".
 */
export async function axeViolations(page: Page): Promise<string[]> {
  await page.addScriptTag({ path: AXE });
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, options: object) => Promise<{ violations: { id: string; nodes: { target: string[] }[] }[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"] } });
    return result.violations.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
  });
}
