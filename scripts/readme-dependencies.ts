/**
 * Writes the README's table of runtime dependencies (package.json's `dependencies`, each with the
 * exact version and the licence its installed package declares) between the markers
 * `<!-- runtime-dependencies:start -->` and `<!-- runtime-dependencies:end -->`.
 *
 *   npm run readme:dependencies            rewrites the table
 *   npm run readme:dependencies -- --check exits 1 when the table is not current
 *
 * tests/lib/readme-security.test.ts fails when the table and package.json disagree.
 */
import fs from "node:fs";
import path from "node:path";

const ROOT = path.resolve(__dirname, "..");
export const START = "<!-- runtime-dependencies:start -->";
export const END = "<!-- runtime-dependencies:end -->";

function licenceOf(name: string): string {
  const file = path.join(ROOT, "node_modules", name, "package.json");
  if (!fs.existsSync(file)) return "(not installed)";
  const manifest = JSON.parse(fs.readFileSync(file, "utf8")) as { license?: string | { type?: string } };
  const licence = typeof manifest.license === "string" ? manifest.license : manifest.license?.type;
  return licence ?? "(not stated)";
}

export function dependencyTable(): string {
  const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8")) as { dependencies: Record<string, string> };
  const rows = Object.entries(manifest.dependencies)
    .sort(([a], [b]) => a.localeCompare(b, "en"))
    .map(([name, version]) => `| \`${name}\` | ${version} | ${licenceOf(name)} |`);
  return ["| package | version | licence |", "|---|---|---|", ...rows].join("\n");
}

function main(): void {
  const readmePath = path.join(ROOT, "README.md");
  const readme = fs.readFileSync(readmePath, "utf8");
  const start = readme.indexOf(START);
  const end = readme.indexOf(END);
  if (start < 0 || end < start) throw new Error(`README.md has no ${START} … ${END} section`);
  const updated = `${readme.slice(0, start + START.length)}\n${dependencyTable()}\n${readme.slice(end)}`;
  if (process.argv.includes("--check")) {
    if (updated !== readme) {
      console.error("README.md's runtime dependencies differ from package.json: run `npm run readme:dependencies`.");
      process.exit(1);
    }
    return;
  }
  fs.writeFileSync(readmePath, updated);
}

if (require.main === module) main();
