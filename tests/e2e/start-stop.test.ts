import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stopServer } from "@/db/local-server";
import { demoUser } from "../support/demo-users";
import {
  childrenOf,
  processesMentioning,
  runStartCommand,
  SPARE_PG_PORT,
  SPARE_PORT,
  stopLeftoverStartCommands,
  TEST_DATA_DIR,
  type StartCommand,
} from "../support/start-command";
import { launchBrowser } from "./support/browser";

/**
 * `npm start` (scripts/start.sh, as npm runs it) in a folder and on ports of its own, stopped in
 * every way it can end. After each, the requirement: the app's port and the cluster's port are
 * free (and the local fake mail provider's) and no PostgreSQL process of that folder remains, unless every process of the command
 * was killed at once, and then the next start takes the cluster over instead of failing.
 */
const dataDir = path.join(TEST_DATA_DIR, "start-stop");
const clusterDir = path.join(dataDir, "postgres");
const url = `http://127.0.0.1:${SPARE_PORT}`;

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  // Leave nothing behind if a round failed half-way.
  await stopLeftoverStartCommands();
  stopServer({ dataDir: clusterDir });
});

function portIsFree(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const probe = net.createServer();
    probe.once("error", () => resolve(false));
    probe.listen(port, "127.0.0.1", () => probe.close(() => resolve(true)));
  });
}

function postmasterPid(): number {
  return Number(fs.readFileSync(path.join(clusterDir, "postmaster.pid"), "utf8").split("\n")[0]);
}

/** Whether a process runs. A zombie (ended, not yet reaped by its new parent, init) does not. */
function isAlive(pid: number): boolean {
  try {
    const stat = fs.readFileSync(`/proc/${pid}/stat`, "utf8");
    return stat.slice(stat.lastIndexOf(")") + 2, stat.lastIndexOf(")") + 3) !== "Z";
  } catch {
    return false;
  }
}

/** Starts the command, waits until it serves, and signs in as the demo administrator in Chromium. */
async function startAndBrowse(): Promise<{ run: StartCommand; postmaster: number; page: () => Promise<void> }> {
  const run = runStartCommand(
    { PORT: String(SPARE_PORT), BELLWETHER_PG_PORT: String(SPARE_PG_PORT), BELLWETHER_DATA_DIR: dataDir },
    { shell: true },
  );
  await run.waitFor(`bellwether: serving on ${url}`);
  const context = await browser.newContext({ baseURL: url });
  const page = await context.newPage();
  const admin = demoUser("admin");
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(admin.email);
  await page.getByLabel("Password").fill(admin.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL("/");
  // The page stays open while the command is stopped, holding its connections, as a person's would.
  return { run, postmaster: postmasterPid(), page: () => context.close() };
}

/** The port of the local fake mail provider that the command says it started. */
function mailFakePort(run: StartCommand): number {
  const match = /bellwether: e-mail goes to the local fake provider at http:\/\/127\.0\.0\.1:(\d+) /.exec(run.output());
  if (!match) throw new Error(`the start command did not start the fake mail provider:\n${run.output()}`);
  return Number(match[1]);
}

async function expectEverythingStopped(postmaster: number, run: StartCommand) {
  expect(await portIsFree(mailFakePort(run))).toBe(true);
  expect(await portIsFree(SPARE_PORT)).toBe(true);
  expect(await portIsFree(SPARE_PG_PORT)).toBe(true);
  expect(isAlive(postmaster)).toBe(false);
  expect(childrenOf(postmaster)).toEqual([]);
  expect(processesMentioning(clusterDir)).toEqual([]);
  expect(fs.existsSync(path.join(clusterDir, "postmaster.pid"))).toBe(false);
}

describe("npm start stops the app and its private PostgreSQL however it ends", () => {
  it("on Ctrl-C: SIGINT to the whole foreground process group", { timeout: 120_000 }, async () => {
    const { run, postmaster, page } = await startAndBrowse();
    process.kill(-run.child.pid!, "SIGINT");
    expect(await run.exited).toEqual({ code: 0, signal: null });
    await page();
    // The command and the app both received SIGINT, and the app's exit also asks for a stop: one stop runs.
    expect(run.output().split("bellwether: stopped the private PostgreSQL").length - 1).toBe(1);
    await expectEverythingStopped(postmaster, run);
  });

  it("on SIGTERM sent to the start command alone", async () => {
    const { run, postmaster, page } = await startAndBrowse();
    process.kill(run.child.pid!, "SIGTERM");
    expect(await run.exited).toEqual({ code: 0, signal: null });
    await page();
    await expectEverythingStopped(postmaster, run);
  });

  it("on SIGHUP to the process group, as when the terminal closes", async () => {
    const { run, postmaster, page } = await startAndBrowse();
    process.kill(-run.child.pid!, "SIGHUP");
    expect(await run.exited).toEqual({ code: 0, signal: null });
    await page();
    await expectEverythingStopped(postmaster, run);
  });

  it("when the app crashes (SIGKILL of the app alone), with a failure exit code", async () => {
    const { run, postmaster, page } = await startAndBrowse();
    const apps = childrenOf(run.child.pid!).filter((p) => p.command.includes("scripts/serve.ts"));
    expect(apps).toHaveLength(1);
    process.kill(apps[0].pid, "SIGKILL");
    expect(await run.exited).toEqual({ code: 1, signal: null });
    await page();
    expect(run.output()).toContain("bellwether: the app stopped unexpectedly (SIGKILL)");
    await expectEverythingStopped(postmaster, run);
  });

  it("takes over a cluster left running when every process of an earlier start was killed", async () => {
    const first = await startAndBrowse();
    // SIGKILL cannot be handled: the command and the app die, the cluster (its own session) stays.
    process.kill(-first.run.child.pid!, "SIGKILL");
    expect(await first.run.exited).toEqual({ code: null, signal: "SIGKILL" });
    await first.page();
    expect(isAlive(first.postmaster)).toBe(true);
    expect(await portIsFree(SPARE_PG_PORT)).toBe(false);

    const second = await startAndBrowse();
    expect(second.run.output()).toContain(`bellwether: private PostgreSQL on 127.0.0.1:${SPARE_PG_PORT}`);
    expect(second.run.output()).toContain("found running from an earlier start and taken over");
    expect(second.postmaster).toBe(first.postmaster);
    process.kill(-second.run.child.pid!, "SIGINT");
    expect(await second.run.exited).toEqual({ code: 0, signal: null });
    await second.page();
    await expectEverythingStopped(second.postmaster, second.run);
  });
});
