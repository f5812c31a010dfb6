import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";
import { CliError } from "@/scripts/cli/cli-error";
import { runCli, type Command } from "@/scripts/cli/main";

// The error policy under test is the one README.md states for the command line: a usage error
// is one stderr line and exit code 2; a crash is one line saying it is a bug in Bellwether, not
// a usage error (the stack only with --debug), and exit code 1.

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
const CRASH_LINE =
  /^bellwether: internal error \(TypeError: boom\)\. This is a bug in Bellwether, not a usage error; please report it with the command that caused it/;

/** Runs runCli in-process with stand-in commands and collects what it writes to stderr. */
async function run(argv: string[], command: Command): Promise<{ code: number; stderr: string }> {
  let stderr = "";
  const code = await runCli(argv, { test: async () => command }, { writeErr: (t) => (stderr += t) });
  return { code, stderr };
}

const crashes: Command = async () => {
  throw new TypeError("boom\nsecond line of the message");
};

describe("runCli", () => {
  it("passes the command's exit code through and strips --debug from its arguments", async () => {
    let seen: string[] = [];
    const r = await run(["test", "a", "--debug", "b"], async (args) => {
      seen = args;
      return 0;
    });
    expect(r).toEqual({ code: 0, stderr: "" });
    expect(seen).toEqual(["a", "b"]);
  });

  it("prints a usage error as one line and exits 2", async () => {
    const r = await run(["test"], async () => {
      throw new CliError("--model is required\nusage: …");
    });
    expect(r).toEqual({ code: 2, stderr: "bellwether: --model is required\n" });
    const unknown = await run(["nonsense"], crashes);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toBe('bellwether: unknown command "nonsense"\n');
    expect((await run([], crashes)).stderr).toBe("bellwether: usage:\n");
  });

  it("reports a crash as a bug in one line without the stack, and exits 1", async () => {
    const r = await run(["test"], crashes);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(CRASH_LINE);
    expect(r.stderr).toMatch(/\(--debug prints the stack\)\.\n$/);
    expect(r.stderr.split("\n")).toHaveLength(2); // one line and the final newline
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it("adds the stack under --debug", async () => {
    const r = await run(["test", "--debug"], crashes);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(CRASH_LINE);
    expect(r.stderr).toMatch(/\nTypeError: boom\nsecond line of the message\n\s+at /);
  });

  it("treats a thrown non-Error as a crash too", async () => {
    const r = await run(["test"], async () => {
      throw "a string";
    });
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/^bellwether: internal error \(a string\)\. This is a bug in Bellwether/);
  });
});

// The same policy end to end: tests/cli/support/break-json.cjs makes printing the estimate
// throw, as a bug would.
describe.concurrent("bellwether as a process, when it crashes", () => {
  const args = ["--require", "./tests/cli/support/break-json.cjs", "scripts/bellwether.ts", "estimate", "tests/fixtures/estimate-lognormal-80.csv"];
  async function cli(extra: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
    try {
      const { stdout, stderr } = await exec(TSX, [...args, ...extra], { cwd: ROOT });
      return { code: 0, stdout, stderr };
    } catch (e) {
      const err = e as { code: number; stdout: string; stderr: string };
      return { code: err.code, stdout: err.stdout, stderr: err.stderr };
    }
  }

  it("exits 1 with one line, and the stack only with --debug", async () => {
    const [plain, debug] = await Promise.all([cli([]), cli(["--debug"])]);
    expect(plain.code).toBe(1);
    expect(plain.stdout).toBe("");
    expect(plain.stderr).toBe(
      "bellwether: internal error (TypeError: JSON.stringify broken on purpose by the crash test). " +
        "This is a bug in Bellwether, not a usage error; please report it with the command that caused it " +
        "(--debug prints the stack).\n",
    );
    expect(debug.code).toBe(1);
    expect(debug.stderr.split("\n")[1]).toBe("TypeError: JSON.stringify broken on purpose by the crash test");
    expect(debug.stderr).toMatch(/\n\s+at .*scripts\/cli\/estimate\.ts/);
  }, 60_000);
});
