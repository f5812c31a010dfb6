import { describe, expect, it, vi } from "vitest";
import { z } from "zod";
import { AppError } from "@/lib/api/errors";
import { toProblem } from "@/lib/api/problem";
import { StatsInputError } from "@/lib/stats/validate";

// runAction reads the caller from the session; here a signed-in scientist, so the test is
// about how a failure of the work is reported.
vi.mock("@/lib/auth/session", () => ({
  currentSession: async () => ({
    caller: { kind: "user", id: "u1", email: "s@example.test", name: "S", role: "scientist", active: true, mustChangePassword: false },
    sessionId: "s1",
  }),
}));

describe("one error family", () => {
  it("answers the engine's input errors as 422 problem+json with their own message", () => {
    // RFC 9457 fields; 422 for input the server understood but cannot use (DESIGN.md, REST API).
    expect(toProblem(new StatsInputError("values is empty"), "/api/v1/x")).toEqual({
      type: "urn:bellwether:problem:invalid",
      title: "Invalid input",
      status: 422,
      detail: "values is empty",
      instance: "/api/v1/x",
    });
  });

  it("keeps AppError's status and answers anything unknown with a generic 500", () => {
    expect(toProblem(new AppError("conflict", "Already signed."))).toMatchObject({ status: 409, detail: "Already signed." });
    const spy = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const unknown = toProblem(new TypeError("secret internals"));
    spy.mockRestore();
    expect(unknown.status).toBe(500);
    expect(unknown.detail).not.toContain("secret internals");
  });

  it("lets a server action show the engine's message instead of a generic failure", async () => {
    const { runAction } = await import("@/lib/auth/action");
    const state = await runAction("studies:write", z.object({}), new FormData(), async () => {
      throw new StatsInputError("transform \"ln\" needs every value to be positive");
    });
    expect(state).toEqual({ status: "error", message: 'transform "ln" needs every value to be positive' });
  });
});
