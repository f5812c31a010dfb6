/**
 * Every way into the app from outside, listed from the code itself so that a test over them
 * fails when a new one appears without a row: the route handlers (`app/**\/route.ts` and the
 * HTTP methods each exports) and the server actions (the exported functions of every file that
 * starts with "use server", and every action the production build registered).
 */
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";

export const ROOT = path.resolve(__dirname, "..", "..");
const HTTP_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"];

function walk(dir: string, keep: (file: string) => boolean): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return entry.name === "node_modules" || entry.name.startsWith(".") ? [] : walk(full, keep);
    return keep(full) ? [full] : [];
  });
}

/** The methods a route module exports: `export const GET`, `export async function POST`, `export { x as PUT }`. */
export function exportedMethods(source: string): string[] {
  const found = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:const|let|async\s+function|function)\s+([A-Z]+)\b/g)) found.add(m[1]);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(",")) {
      const name = part.trim().split(/\s+as\s+/).pop()?.trim();
      if (name) found.add(name);
    }
  }
  return HTTP_METHODS.filter((method) => found.has(method));
}

/** "METHOD /path/[param]" for every route handler under app/, route groups left out of the path. */
export function routeHandlerKeys(): string[] {
  const files = walk(path.join(ROOT, "app"), (f) => path.basename(f) === "route.ts" || path.basename(f) === "route.tsx");
  return files
    .flatMap((file) => {
      const segments = path
        .relative(path.join(ROOT, "app"), path.dirname(file))
        .split(path.sep)
        .filter((s) => !(s.startsWith("(") && s.endsWith(")")));
      const urlPath = `/${segments.join("/")}`;
      return exportedMethods(readFileSync(file, "utf8")).map((method) => `${method} ${urlPath}`);
    })
    .sort();
}

/** The URL path of every page (`app/**\/page.tsx`), route groups left out, dynamic segments as written. */
export function pagePaths(): string[] {
  const files = walk(path.join(ROOT, "app"), (f) => /^page\.(tsx|ts|jsx|js)$/.test(path.basename(f)));
  return files
    .map((file) => {
      const segments = path
        .relative(path.join(ROOT, "app"), path.dirname(file))
        .split(path.sep)
        .filter((s) => s !== "" && !(s.startsWith("(") && s.endsWith(")")));
      return `/${segments.join("/")}`;
    })
    .sort();
}

/** Whether a module's first statement is the "use server" directive (comments before it allowed). */
function isServerActionFile(source: string): boolean {
  const withoutComments = source.replace(/^\s*(?:\/\/[^\n]*\n|\/\*[\s\S]*?\*\/)*/g, "").trimStart();
  return /^["']use server["']/.test(withoutComments);
}

/** The names a "use server" module exports (functions, consts, and names in export lists). */
function exportedNames(source: string): string[] {
  const found = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:async\s+function|function|const|let)\s+([A-Za-z_$][\w$]*)/g)) found.add(m[1]);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(",")) {
      const name = part.trim().split(/\s+as\s+/).pop()?.trim();
      if (name) found.add(name);
    }
  }
  return [...found];
}

/** "file#export" for every exported function of every "use server" file in app/, components/ and lib/. */
export function serverActionKeys(): string[] {
  const files = ["app", "components", "lib"].flatMap((dir) =>
    walk(path.join(ROOT, dir), (f) => /\.(ts|tsx)$/.test(f) && !f.endsWith(".d.ts")),
  );
  return files
    .filter((file) => isServerActionFile(readFileSync(file, "utf8")))
    .flatMap((file) => exportedNames(readFileSync(file, "utf8")).map((name) => `${path.relative(ROOT, file)}#${name}`))
    .sort();
}

export interface BuiltAction {
  id: string;
  key: string;
  /** A page path that serves the action (its route groups left out), e.g. "/admin/users". */
  pagePath: string;
}

/**
 * The server actions the production build registered (`.next/server/server-reference-manifest.json`),
 * inline ones included: each with its id and a page that serves it. The app under test is this build.
 */
export function builtServerActions(): BuiltAction[] {
  const file = path.join(ROOT, ".next", "server", "server-reference-manifest.json");
  if (!existsSync(file)) throw new Error("no production build: run the tests through `npm test`, which builds first");
  const manifest = JSON.parse(readFileSync(file, "utf8")) as {
    node: Record<string, { workers: Record<string, unknown>; filename?: string; exportedName?: string }>;
  };
  return Object.entries(manifest.node).map(([id, entry]) => {
    const pages = Object.keys(entry.workers)
      .map((worker) =>
        `/${worker
          .replace(/^app\//, "")
          .replace(/\/page$/, "")
          .split("/")
          .filter((s) => !(s.startsWith("(") && s.endsWith(")")))
          .join("/")}`.replace(/\/$/, "") || "/",
      )
      // A page without dynamic segments can be posted to as it is.
      .sort((a, b) => Number(a.includes("[")) - Number(b.includes("[")));
    return { id, key: `${entry.filename ?? "?"}#${entry.exportedName ?? "?"}`, pagePath: pages[0] ?? "/" };
  });
}
