import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(__dirname, "..", "..");
const readme = fs.readFileSync(path.join(ROOT, "README.md"), "utf8");
const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8")) as { dependencies: Record<string, string> };

/** The README's security section (issue 12, "Security basics"). */
describe("README's security section", () => {
  const section = readme.slice(readme.indexOf("## Security"), readme.indexOf("\n## ", readme.indexOf("## Security") + 1));

  it("lists exactly package.json's runtime dependencies with their versions (`npm run readme:dependencies` rewrites it)", () => {
    const table = section.slice(section.indexOf("<!-- runtime-dependencies:start -->"), section.indexOf("<!-- runtime-dependencies:end -->"));
    const listed = Object.fromEntries([...table.matchAll(/^\| `([^`]+)` \| ([^ |]+) \|/gm)].map((m) => [m[1], m[2]]));
    expect(listed).toEqual(manifest.dependencies);
  });

  it("says what each role may do, how keys are stored and how to back up", () => {
    // DESIGN.md's roles table, written out: one row per capability.
    for (const row of [
      "| manage users and LIS connections | yes | | | | |",
      "| read the audit trail | yes | yes | | | |",
      "| create studies, upload, exclude, estimate, draft and submit versions | | yes | yes | | |",
      "| read donor-level data | | yes | yes | | |",
      "| sign off, return and withdraw a version | | yes, never one they drafted or submitted | | | |",
      "| read the intervals in force, score values | yes | yes | yes | yes | yes |",
    ]) {
      expect(section).toContain(row);
    }
    expect(section).toContain("Bellwether keeps only their SHA-256 and first 12 characters");
    expect(section).toContain("`npm run backup`");
    expect(section).toContain("`npm run restore FILE`");
  });
});
