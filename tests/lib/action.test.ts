import { beforeEach, describe, expect, it, vi } from "vitest";
import { z } from "zod";
import type { Caller } from "@/lib/auth/authorize";

// runAction reads the session through lib/auth/session.ts; here it is replaced by a caller
// chosen per test, so that the rule itself is checked without a server.
const session = vi.hoisted(() => ({ current: null as { caller: Caller; sessionId: string } | null }));
vi.mock("@/lib/auth/session", () => ({ currentSession: async () => session.current }));

const { runAction } = await import("@/lib/auth/action");

const admin = (mustChangePassword: boolean): Caller => ({
  kind: "user",
  id: "00000000-0000-4000-8000-000000000009",
  email: "admin@example.test",
  name: "Admin",
  role: "admin",
  active: true,
  mustChangePassword,
});

const form = (entries: Record<string, string>) => {
  const data = new FormData();
  for (const [k, v] of Object.entries(entries)) data.set(k, v);
  return data;
};

describe("server actions while a password set by an administrator awaits replacement", () => {
  beforeEach(() => {
    session.current = { caller: admin(true), sessionId: "session-1" };
  });

  it("refuse everything else, even what the role allows, and run nothing", async () => {
    const work = vi.fn(async () => "done");
    expect(await runAction("users:manage", z.object({}), form({}), work)).toEqual({
      status: "error",
      message: "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.",
    });
    expect(await runAction(null, z.object({}), form({}), work)).toMatchObject({ status: "error" });
    expect(work).not.toHaveBeenCalled();
  });

  it("run the change of one's own password, with this session's id", async () => {
    const work = vi.fn(async () => ({ message: "changed", sessionTicket: "t" }));
    expect(await runAction(null, z.object({ next: z.string() }), form({ next: "x" }), work, { whilePasswordChangeRequired: true })).toEqual({
      status: "ok",
      message: "changed",
      sessionTicket: "t",
    });
    expect(work).toHaveBeenCalledWith(admin(true), { next: "x" }, { sessionId: "session-1" });
  });

  it("run as before once the person has chosen their own password", async () => {
    session.current = { caller: admin(false), sessionId: "session-2" };
    expect(await runAction("users:manage", z.object({}), form({}), async () => "done")).toEqual({ status: "ok", message: "done" });
  });

  it("refuse a caller with no current session (signed out, or ended by a change)", async () => {
    session.current = null;
    expect(await runAction(null, z.object({}), form({}), async () => "done")).toEqual({ status: "error", message: "Sign in to continue." });
  });
});

describe("server actions whose work refuses named fields", () => {
  it("mark those fields, as the schema's own errors are marked", async () => {
    session.current = { caller: admin(false), sessionId: "session-3" };
    const { AppError } = await import("@/lib/api/errors");
    const message = "An analyte with the code GLU already exists; edit it, or choose another code.";
    const state = await runAction("users:manage", z.object({}), form({}), async () => {
      throw new AppError("conflict", message, { errors: [{ path: "code", message }] });
    });
    expect(state).toEqual({ status: "error", message, fieldErrors: { code: message } });
  });
});

describe("server actions given text that cannot be stored", () => {
  beforeEach(() => {
    session.current = { caller: { ...admin(false), role: "scientist" }, sessionId: "session-2" };
  });

  // (FormData holds USV strings: an unpaired surrogate is already U+FFFD there.)
  it("refuse a NUL at the field, before parsing or any work", async () => {
    const work = vi.fn(async () => "done");
    const schema = z.object({ title: z.string() });
    expect(await runAction(null, schema, form({ title: "Glu\u0000cose" }), work)).toEqual({
      status: "error",
      message: "Please correct the marked fields.",
      fieldErrors: { title: "the text holds the character U+0000 (NUL), which cannot be stored; remove it." },
    });
    expect(work).not.toHaveBeenCalled();
    // HTML, SQL and formula text are text: the work runs with them as given.
    expect(await runAction(null, schema, form({ title: "<b>=1+1</b>'; --" }), work)).toEqual({ status: "ok", message: "done" });
    expect(work).toHaveBeenCalledWith(expect.anything(), { title: "<b>=1+1</b>'; --" }, { sessionId: "session-2" });
  });
});
