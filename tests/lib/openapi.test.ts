import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { API_EXAMPLES } from "@/lib/api/examples";
import { openApiDocument } from "@/lib/api/openapi";
import { scoreRequestSchema } from "@/lib/scores/schemas";

const ROOT = path.resolve(__dirname, "../..");
const API_DIR = path.join(ROOT, "app/api/v1");
const HTTP_METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE", "HEAD", "OPTIONS"] as const;

/**
 * Documented paths whose route files come from branches not merged yet. Each entry must have no
 * route file (checked below), so the list cannot outlive the merge that brings the route.
 */
const AWAITING_MERGE = new Set<string>([]);

interface RouteFile {
  file: string;
  /** The OpenAPI path the file serves, e.g. /api/v1/studies/{id}/estimates. */
  path: string;
  methods: string[];
  source: string;
}

function routeFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return routeFiles(full);
    return entry.name === "route.ts" || entry.name === "route.tsx" ? [full] : [];
  });
}

/** app/api/v1/studies/[id]/route.ts → /api/v1/studies/{id}; null for a catch-all. Route groups are left out. */
function openApiPathOf(file: string): string | null {
  const segments = path.relative(path.join(ROOT, "app"), path.dirname(file)).split(path.sep);
  const out: string[] = [];
  for (const segment of segments) {
    if (/^\(.*\)$/.test(segment)) continue;
    if (segment.startsWith("[...") || segment.startsWith("[[...")) return null;
    out.push(segment.replace(/^\[(.+)\]$/, "{$1}"));
  }
  return `/${out.join("/")}`;
}

/** The HTTP methods a route module exports, read from its source (`export const GET`, `export function POST`, `export { x as GET }`). */
function exportedMethods(source: string): string[] {
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

const ROUTES: RouteFile[] = routeFiles(API_DIR).flatMap((file) => {
  const openApiPath = openApiPathOf(file);
  if (openApiPath === null) return [];
  const source = readFileSync(file, "utf8");
  return [{ file: path.relative(ROOT, file), path: openApiPath, methods: exportedMethods(source), source }];
});

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };
const doc = JSON.parse(JSON.stringify(openApiDocument())) as { [key: string]: Json } & {
  openapi: string;
  paths: Record<string, Record<string, { security?: Record<string, string[]>[]; responses: Record<string, Json>; requestBody?: Json; parameters?: Json[] }>>;
};

function refsIn(value: Json, at: string, out: { ref: string; at: string }[] = []): { ref: string; at: string }[] {
  if (Array.isArray(value)) value.forEach((v, i) => refsIn(v, `${at}/${i}`, out));
  else if (value && typeof value === "object") {
    for (const [key, v] of Object.entries(value)) {
      if (key === "$ref" && typeof v === "string") out.push({ ref: v, at });
      else refsIn(v, `${at}/${key}`, out);
    }
  }
  return out;
}

function resolvePointer(root: Json, ref: string): Json | undefined {
  if (!ref.startsWith("#/")) return undefined;
  let node: Json | undefined = root;
  for (const raw of ref.slice(2).split("/")) {
    const key = raw.replace(/~1/g, "/").replace(/~0/g, "~");
    if (node === null || typeof node !== "object" || !(key in node)) return undefined;
    node = (node as Record<string, Json>)[key];
  }
  return node;
}

describe("the OpenAPI document", () => {
  it("is OpenAPI 3.1.0 with the session cookie and bearer key schemes", () => {
    expect(doc.openapi).toBe("3.1.0");
    const schemes = (doc.components as { securitySchemes: Record<string, { type: string; scheme?: string; in?: string }> }).securitySchemes;
    expect(schemes.bearerAuth).toMatchObject({ type: "http", scheme: "bearer" });
    expect(schemes.sessionCookie).toMatchObject({ type: "apiKey", in: "cookie" });
  });

  it("resolves every $ref inside itself", () => {
    const refs = refsIn(doc, "#");
    expect(refs.length).toBeGreaterThan(50);
    const broken = refs.filter(({ ref }) => resolvePointer(doc, ref) === undefined).map(({ ref, at }) => `${ref} (at ${at})`);
    expect(broken).toEqual([]);
  });

  it("finds the route files it checks (the walk itself works)", () => {
    // A few routes written out by hand, so that a broken walk cannot pass the coverage test empty.
    const byPath = new Map(ROUTES.map((r) => [r.path, r.methods]));
    expect(byPath.get("/api/v1/analytes")).toEqual(["GET", "POST"]);
    expect(byPath.get("/api/v1/analytes/{code}")).toEqual(["GET", "PATCH"]);
    expect(byPath.get("/api/v1/studies/{id}/exclusions/{exclusionId}")).toEqual(["DELETE"]);
    expect(byPath.get("/api/v1/openapi.json")).toEqual(["GET"]);
    expect(byPath.has("/api/v1/{...path}")).toBe(false);
    expect(ROUTES.every((r) => r.methods.length > 0)).toBe(true);
  });

  it("documents every route handler and method under app/api/v1", () => {
    const missing = ROUTES.flatMap((r) =>
      r.methods.filter((m) => !doc.paths[r.path]?.[m.toLowerCase()]).map((m) => `${m} ${r.path} (${r.file})`),
    );
    expect(missing).toEqual([]);
  });

  it("documents no route that does not exist (except those awaiting a merge)", () => {
    const served = new Map(ROUTES.map((r) => [r.path, r.methods]));
    const extra = Object.entries(doc.paths).flatMap(([p, item]) =>
      Object.keys(item)
        .filter((m) => !served.get(p)?.includes(m.toUpperCase()))
        .filter(() => !AWAITING_MERGE.has(p))
        .map((m) => `${m.toUpperCase()} ${p}`),
    );
    expect(extra).toEqual([]);
    for (const p of AWAITING_MERGE) expect(served.has(p), `${p} has a route now: take it off AWAITING_MERGE`).toBe(false);
  });

  it("marks exactly the operations whose handler accepts an LIS key", () => {
    const keyed = (p: string, m: string) => (doc.paths[p][m].security ?? []).some((s) => "bearerAuth" in s);
    // DESIGN.md: keys may score and read in-force intervals (scores, intervals, FHIR, reading analytes).
    expect(keyed("/api/v1/scores", "post")).toBe(true);
    expect(keyed("/api/v1/fhir/Observation/$score", "post")).toBe(true);
    expect(keyed("/api/v1/analytes/{code}/intervals", "get")).toBe(true);
    expect(keyed("/api/v1/analytes", "get")).toBe(true);
    expect(keyed("/api/v1/analytes", "post")).toBe(false);
    expect(keyed("/api/v1/studies/{id}/donor-results", "get")).toBe(false);

    // Once apiRoute knows keys, each handler's own `lisKey: true` must match the document.
    const handlerSource = readFileSync(path.join(ROOT, "lib/api/handler.ts"), "utf8");
    if (!handlerSource.includes("lisKey")) return;
    const mismatched: string[] = [];
    for (const r of ROUTES) {
      for (const m of r.source.matchAll(/export\s+const\s+([A-Z]+)\s*=\s*apiRoute\(\s*\{([^}]*)\}/g)) {
        const [, method, config] = m;
        const accepts = /lisKey:\s*true/.test(config);
        if (doc.paths[r.path]?.[method.toLowerCase()] && accepts !== keyed(r.path, method.toLowerCase())) {
          mismatched.push(`${method} ${r.path}: handler ${accepts ? "accepts" : "refuses"} keys`);
        }
      }
    }
    expect(mismatched).toEqual([]);
  });

  it("documents the problem+json errors each operation can answer", () => {
    const scores = doc.paths["/api/v1/scores"].post.responses;
    expect(Object.keys(scores).sort()).toEqual(["200", "400", "401", "403", "413", "415", "422", "429", "503"]);
    expect(resolvePointer(doc, (scores["429"] as { $ref: string }).$ref)).toMatchObject({
      headers: { "Retry-After": expect.any(Object) },
      content: { "application/problem+json": { schema: { $ref: "#/components/schemas/Problem" } } },
    });
    const fhir = doc.paths["/api/v1/fhir/Observation/$score"].post.responses;
    expect(resolvePointer(doc, (fhir["401"] as { $ref: string }).$ref)).toMatchObject({
      content: { "application/fhir+json": { schema: { $ref: "#/components/schemas/OperationOutcome" } } },
    });
    for (const [p, item] of Object.entries(doc.paths)) {
      for (const [m, op] of Object.entries(item)) {
        const codes = Object.keys(op.responses);
        if (codes.length === 1 && codes[0] === "405") continue;
        expect(codes.some((c) => c === "200" || c === "201"), `${m} ${p} has a success answer`).toBe(true);
        if (p !== "/api/v1/openapi.json") expect(codes, `${m} ${p}`).toEqual(expect.arrayContaining(["401", "403", "503"]));
        if (op.requestBody || op.parameters) expect(codes, `${m} ${p}`).toContain("422");
      }
    }
    expect(doc.paths["/api/v1/studies/{id}/uploads"].post.requestBody).toMatchObject({ content: { "multipart/form-data": expect.any(Object) } });
  });

  it("holds no key and no secret", () => {
    const text = JSON.stringify(doc);
    expect(text).not.toMatch(/bwk_[A-Za-z0-9_-]{20,}/);
    expect(text).not.toMatch(/password"\s*:\s*"[^"]+"/i);
  });

  it("gives scoring examples that the scores schema accepts", () => {
    const scoreExamples = API_EXAMPLES.filter((e) => e.path === "/api/v1/scores");
    expect(scoreExamples.length).toBe(4);
    for (const e of scoreExamples) expect(scoreRequestSchema.safeParse(e.body).success, e.id).toBe(true);
  });
});

describe("the route-file walk", () => {
  it("skips the catch-all and reads re-exported methods", () => {
    expect(openApiPathOf(path.join(API_DIR, "[...path]/route.ts"))).toBeNull();
    expect(openApiPathOf(path.join(API_DIR, "studies/[id]/uploads/[uploadId]/commit/route.ts"))).toBe("/api/v1/studies/{id}/uploads/{uploadId}/commit");
    expect(exportedMethods("export { notFound as GET, notFound as POST };\nexport const dynamic = 1;")).toEqual(["GET", "POST"]);
    expect(exportedMethods("export async function PATCH() {}\nexport const revalidate = 0;")).toEqual(["PATCH"]);
    expect(existsSync(path.join(API_DIR, "openapi.json/route.ts"))).toBe(true);
  });
});
