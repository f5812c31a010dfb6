/**
 * The identity of the code that computed an estimate: the package version and, where it can be
 * known, the git commit. lib/stats is pure and cannot read files or run git, so the command
 * line (and the app) stamp its documents here before printing or storing them.
 */
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync, realpathSync } from "node:fs";
import path from "node:path";
import packageJson from "../package.json";
import { engineEnv, type EngineEnv } from "./env";
import type { EngineIdentity, Provenance } from "./stats/estimate";

/**
 * The repository root: the nearest folder above this code holding our own package.json, which
 * is lib/ when run from source and .cli-build/ when run from the command line's bundle. The
 * app's server bundle (Next with Turbopack) replaces __dirname with a placeholder ("/ROOT/lib")
 * and has its own .next/package.json, so there the search starts again from the working
 * directory, which the server is started in.
 */
const ROOT = ourPackageRoot(__dirname) ?? ourPackageRoot(process.cwd()) ?? path.resolve(__dirname, "..");

function ourPackageRoot(from: string): string | null {
  for (let dir = from; ; dir = path.dirname(dir)) {
    const file = path.join(dir, "package.json");
    if (existsSync(file) && isOurPackage(file)) return dir;
    if (path.dirname(dir) === dir) return null;
  }
}

function isOurPackage(file: string): boolean {
  try {
    return (JSON.parse(readFileSync(file, "utf8")) as { name?: unknown }).name === packageJson.name;
  } catch {
    return false;
  }
}

function git(root: string, args: string[]): string | null {
  try {
    return execFileSync("git", ["-C", root, ...args], {
      encoding: "utf8",
      stdio: ["ignore", "pipe", "ignore"],
      timeout: 5000,
    }).trim();
  } catch {
    return null;
  }
}

function samePath(a: string, b: string): boolean {
  try {
    return realpathSync(a) === realpathSync(b);
  } catch {
    return false;
  }
}

/**
 * Reads the engine's identity: `BELLWETHER_COMMIT` when set (a deployment without its .git
 * folder), otherwise `git rev-parse HEAD` of the repository at `root`, and whether tracked
 * files differ from that commit. The commit is null when `root` is not itself the top of a git
 * working tree (an installed copy inside some other repository must not borrow its commit).
 * @param env the validated engine variables (default: the process environment)
 * @param root the folder holding package.json (default: this repository)
 */
export function readEngineIdentity(env: EngineEnv = engineEnv(), root: string = ROOT): EngineIdentity {
  const base = { name: packageJson.name, version: packageJson.version };
  if (env.BELLWETHER_COMMIT !== undefined) {
    return { ...base, commit: env.BELLWETHER_COMMIT.toLowerCase(), uncommittedChanges: null };
  }
  const top = git(root, ["rev-parse", "--show-toplevel"]);
  const commit = top !== null && samePath(top, root) ? git(root, ["rev-parse", "HEAD"]) : null;
  if (commit === null || !/^[0-9a-f]{40}$/.test(commit)) return { ...base, commit: null, uncommittedChanges: null };
  const status = git(root, ["status", "--porcelain", "--untracked-files=no"]);
  return { ...base, commit, uncommittedChanges: status === null ? null : status !== "" };
}

let cached: EngineIdentity | undefined;

/** The running engine's identity, read once per process. */
export function engineIdentity(): EngineIdentity {
  cached ??= readEngineIdentity();
  return cached;
}

/** A copy of an estimate document with the engine's identity in `provenance.engine`. */
export function stampEngine<T extends { provenance: Provenance }>(doc: T, engine: EngineIdentity = engineIdentity()): T {
  return { ...doc, provenance: { ...doc.provenance, engine } };
}
