/**
 * What `npm run -s bellwether -- …` runs: the command line compiled once into one JavaScript
 * file, instead of tsx compiling the TypeScript on every run.
 *
 * The bundle (.cli-build/bellwether.cjs, git-ignored) is made by esbuild from
 * scripts/bellwether.ts; beside it, manifest.json lists every source file esbuild read outside
 * node_modules with its size and modification time, plus tsconfig.json (its paths) and the
 * package files (a changed dependency changes the lock files). When any of those differ, or the
 * bundle is missing, it is built again before it runs, so a fresh clone and an edited source
 * need no extra step. The bundle and its manifest are written to temporary names and renamed,
 * so two commands started at once never see half a file. esbuild is a pinned devDependency (the same version tsx uses).
 *
 * The bundle runs through node:vm with V8's code cache (.cli-build/bellwether.cjs.cache, written
 * after the first run of each bundle): V8 then skips compiling what it compiled before. V8
 * itself refuses a cache that does not match the source, and a rejected cache is written again.
 *
 * Plain CommonJS on purpose: node runs it as it is, without the ES module loader's start-up.
 */
"use strict";
const fs = require("node:fs");
const Module = require("node:module");
const path = require("node:path");
const vm = require("node:vm");

const ROOT = path.resolve(__dirname, "../..");
const OUT_DIR = path.join(ROOT, ".cli-build");
const BUNDLE = path.join(OUT_DIR, "bellwether.cjs");
const MANIFEST = path.join(OUT_DIR, "manifest.json");
const CODE_CACHE = `${BUNDLE}.cache`;
const ENTRY = "scripts/bellwether.ts";
/** Besides the sources: what says the installed packages changed, and this file itself. */
const ALWAYS_WATCHED = [
  "package.json",
  "package-lock.json",
  "node_modules/.package-lock.json",
  "tsconfig.json",
  "scripts/cli/launch.cjs",
];

function stamp(rel) {
  try {
    const s = fs.statSync(path.join(ROOT, rel));
    return `${s.size}:${s.mtimeMs}`;
  } catch {
    return "missing";
  }
}

function isFresh() {
  let manifest;
  try {
    manifest = JSON.parse(fs.readFileSync(MANIFEST, "utf8"));
  } catch {
    return false;
  }
  if (!fs.existsSync(BUNDLE) || manifest.entry !== ENTRY || typeof manifest.inputs !== "object") return false;
  for (const [rel, was] of Object.entries(manifest.inputs)) {
    if (stamp(rel) !== was) return false;
  }
  return true;
}

function build() {
  const esbuild = require("esbuild");
  fs.mkdirSync(OUT_DIR, { recursive: true });
  const tmp = `${BUNDLE}.${process.pid}.tmp`;
  const result = esbuild.buildSync({
    absWorkingDir: ROOT,
    entryPoints: [ENTRY],
    outfile: tmp,
    bundle: true,
    platform: "node",
    format: "cjs",
    target: "node20",
    tsconfig: path.join(ROOT, "tsconfig.json"),
    metafile: true,
    logLevel: "error",
  });
  const inputs = {};
  for (const rel of Object.keys(result.metafile.inputs)) {
    if (!rel.startsWith("node_modules/") && !rel.includes("/node_modules/")) inputs[rel] = stamp(rel);
  }
  for (const rel of ALWAYS_WATCHED) inputs[rel] = stamp(rel);
  const tmpManifest = `${MANIFEST}.${process.pid}.tmp`;
  fs.writeFileSync(tmpManifest, `${JSON.stringify({ entry: ENTRY, inputs }, null, 2)}\n`);
  fs.rmSync(CODE_CACHE, { force: true });
  fs.renameSync(tmp, BUNDLE);
  fs.renameSync(tmpManifest, MANIFEST);
}

/** Runs the bundle as node would require it, with V8's code cache when there is one. */
function runBundle() {
  const source = fs.readFileSync(BUNDLE, "utf8");
  let cachedData;
  try {
    cachedData = fs.readFileSync(CODE_CACHE);
  } catch {
    cachedData = undefined;
  }
  const script = new vm.Script(Module.wrap(source), { filename: BUNDLE, cachedData });
  if (cachedData === undefined || script.cachedDataRejected) {
    process.on("exit", () => {
      try {
        const tmp = `${CODE_CACHE}.${process.pid}.tmp`;
        fs.writeFileSync(tmp, script.createCachedData());
        fs.renameSync(tmp, CODE_CACHE);
      } catch {
        // A cache that cannot be written only costs the next run its compile time.
      }
    });
  }
  const bundleModule = { exports: {} };
  script
    .runInThisContext()
    .call(bundleModule.exports, bundleModule.exports, Module.createRequire(BUNDLE), bundleModule, BUNDLE, OUT_DIR);
}

if (!isFresh()) {
  try {
    build();
  } catch (err) {
    process.stderr.write(
      `bellwether: could not build the command line (${String(err && err.message ? err.message : err).split("\n")[0]}).\n`,
    );
    process.exit(1);
  }
}
runBundle();
