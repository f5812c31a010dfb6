import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

const ROOT = path.resolve(__dirname, "..", "..");

/** Ports and a folder for tests that run the start command beside the app under test. */
export const SPARE_PORT = Number(process.env.BELLWETHER_TEST_SPARE_PORT ?? 3110);
export const SPARE_PG_PORT = Number(process.env.BELLWETHER_TEST_SPARE_PG_PORT ?? 54349);
export const TEST_DATA_DIR = process.env.BELLWETHER_TEST_DATA_DIR ?? path.join(ROOT, ".test-data");

const running = new Set<StartCommand>();

export interface StartCommand {
  child: ChildProcess;
  /** stdout and stderr so far, interleaved. */
  output(): string;
  /** Resolves when the output contains `text`; rejects, with the output, if the command ends first. */
  waitFor(text: string): Promise<void>;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

/**
 * Runs the start command with only the variables given (plus PATH, HOME, NODE_ENV): the test's own
 * DATABASE_URL and the rest must not leak into it. `shell` runs scripts/start.sh as `npm start`
 * does, in a process group of its own so that a signal can go to the whole group as Ctrl-C sends it.
 */
export function runStartCommand(vars: Record<string, string>, { shell = false } = {}): StartCommand {
  const env: NodeJS.ProcessEnv = { PATH: process.env.PATH, HOME: process.env.HOME, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1", ...vars };
  const [cmd, args] = shell
    ? ["bash", ["scripts/start.sh"]]
    : [process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/start.ts"]];
  const child = spawn(cmd, args, { cwd: ROOT, env, detached: shell, stdio: ["ignore", "pipe", "pipe"] });
  let output = "";
  const waiters: { text: string; resolve: () => void }[] = [];
  const onData = (d: Buffer) => {
    output += d.toString();
    for (const w of waiters.filter((w) => output.includes(w.text))) {
      waiters.splice(waiters.indexOf(w), 1);
      w.resolve();
    }
  };
  child.stdout!.on("data", onData);
  child.stderr!.on("data", onData);
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => {
    child.on("close", (code, signal) => resolve({ code, signal }));
  });
  const run: StartCommand = {
    child,
    output: () => output,
    exited,
    waitFor: (text) =>
      output.includes(text)
        ? Promise.resolve()
        : new Promise<void>((resolve, reject) => {
            waiters.push({ text, resolve });
            void exited.then(({ code, signal }) => {
              if (!output.includes(text)) reject(new Error(`the start command ended (${signal ?? code}) before "${text}":\n${output}`));
            });
          }),
  };
  running.add(run);
  void exited.then(() => running.delete(run));
  return run;
}

/** Stops start commands that a failed test left running (SIGTERM: they stop their cluster too). */
export async function stopLeftoverStartCommands(): Promise<void> {
  for (const run of running) {
    run.child.kill("SIGTERM");
    await run.exited;
  }
}

/** The processes whose parent is `pid` (from /proc). */
export function childrenOf(pid: number): { pid: number; command: string }[] {
  const found: { pid: number; command: string }[] = [];
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      const stat = fs.readFileSync(`/proc/${entry}/stat`, "utf8");
      // "pid (comm) state ppid …": comm may contain spaces, so read after the last ')'.
      const ppid = Number(stat.slice(stat.lastIndexOf(")") + 2).split(" ")[1]);
      if (ppid === pid) found.push({ pid: Number(entry), command: fs.readFileSync(`/proc/${entry}/cmdline`, "utf8").replace(/\0/g, " ").trim() });
    } catch {
      // the process ended while we looked
    }
  }
  return found;
}

/** Processes whose command line mentions `text` (e.g. a cluster's data folder). */
export function processesMentioning(text: string): { pid: number; command: string }[] {
  const found: { pid: number; command: string }[] = [];
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry) || Number(entry) === process.pid) continue;
    try {
      const command = fs.readFileSync(`/proc/${entry}/cmdline`, "utf8").replace(/\0/g, " ").trim();
      if (command.includes(text)) found.push({ pid: Number(entry), command });
    } catch {
      // the process ended while we looked
    }
  }
  return found;
}
