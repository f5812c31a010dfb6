import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { readEngineIdentity, stampEngine } from "@/lib/engine";
import { estimateReferenceInterval } from "@/lib/stats/estimate";

const ROOT = path.resolve(__dirname, "../..");
// Expected values come from outside the module: package.json itself and git's own answers.
const PACKAGE = JSON.parse(readFileSync(path.join(ROOT, "package.json"), "utf8"));
const gitIn = (...args: string[]) => execFileSync("git", args, { cwd: ROOT, encoding: "utf8" }).trim();

describe("readEngineIdentity", () => {
  const outside = mkdtempSync(path.join(tmpdir(), "bellwether-engine-"));
  afterAll(() => rmSync(outside, { recursive: true, force: true }));

  it("names the package version and this repository's commit", () => {
    const e = readEngineIdentity({}, ROOT);
    expect(e.name).toBe(PACKAGE.name);
    expect(e.version).toBe(PACKAGE.version);
    expect(e.commit).toBe(gitIn("rev-parse", "HEAD"));
    expect(e.uncommittedChanges).toBe(gitIn("status", "--porcelain", "--untracked-files=no") !== "");
  });

  it("takes the commit from BELLWETHER_COMMIT when it is set", () => {
    expect(readEngineIdentity({ BELLWETHER_COMMIT: "ABCDEF1" }, outside)).toEqual({
      name: PACKAGE.name,
      version: PACKAGE.version,
      commit: "abcdef1",
      uncommittedChanges: null,
    });
  });

  it("gives null outside a git working tree, and never borrows an enclosing repository's commit", () => {
    expect(readEngineIdentity({}, outside)).toMatchObject({ commit: null, uncommittedChanges: null });
    // lib/ lies inside this repository but is not its top: a copy installed there must not
    // report this repository's commit as its own.
    expect(readEngineIdentity({}, path.join(ROOT, "lib"))).toMatchObject({ commit: null, uncommittedChanges: null });
  });
});

describe("stampEngine", () => {
  it("fills provenance.engine and leaves the rest of the document as it was", () => {
    const doc = estimateReferenceInterval([4.1, 4.4, 4.5, 4.8, 5.0, 5.2], { outliers: "none" });
    const engine = { name: "bellwether", version: "9.9.9", commit: null, uncommittedChanges: null };
    const stamped = stampEngine(doc, engine);
    expect(stamped.provenance.engine).toEqual(engine);
    expect({ ...stamped, provenance: { ...stamped.provenance, engine: null } }).toEqual(doc);
    expect(doc.provenance.engine).toBeNull();
  });
});
