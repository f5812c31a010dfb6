import { describe, expect, it } from "vitest";
import { parseEngineEnv, parseEnv } from "@/lib/env";

const valid = {
  DATABASE_URL: "postgres://postgres:pw@127.0.0.1:54329/bellwether",
  NEXTAUTH_SECRET: "s".repeat(32),
};

describe("parseEnv", () => {
  it("accepts a complete environment and fills the defaults", () => {
    const env = parseEnv(valid);
    expect(env.BELLWETHER_SIGN_IN_MAX_FAILURES).toBe(5);
    expect(env.BELLWETHER_SIGN_IN_LOCK_MINUTES).toBe(15);
    expect(env.NODE_ENV).toBe("development");
  });

  it("names every missing or wrong variable in one message", () => {
    expect(() => parseEnv({ DATABASE_URL: "mysql://x", NEXTAUTH_SECRET: "short" })).toThrow(
      [
        "Bellwether cannot start, the environment is not valid:",
        "  - DATABASE_URL: DATABASE_URL must be a postgres:// connection string",
        "  - NEXTAUTH_SECRET: NEXTAUTH_SECRET must be at least 32 characters",
      ].join("\n"),
    );
    expect(() => parseEnv({ NEXTAUTH_SECRET: "s".repeat(32) })).toThrow(
      "DATABASE_URL: DATABASE_URL is not set; `npm start` sets it for the private PostgreSQL",
    );
  });

  it("reads the sign-in limits as whole numbers", () => {
    expect(parseEnv({ ...valid, BELLWETHER_SIGN_IN_MAX_FAILURES: "3" }).BELLWETHER_SIGN_IN_MAX_FAILURES).toBe(3);
    expect(() => parseEnv({ ...valid, BELLWETHER_SIGN_IN_LOCK_MINUTES: "0" })).toThrow("BELLWETHER_SIGN_IN_LOCK_MINUTES");
  });
});

describe("parseEngineEnv", () => {
  it("accepts a git commit hash or nothing, and names a malformed one", () => {
    expect(parseEngineEnv({})).toEqual({});
    expect(parseEngineEnv({ BELLWETHER_COMMIT: "0123abc" }).BELLWETHER_COMMIT).toBe("0123abc");
    expect(() => parseEngineEnv({ BELLWETHER_COMMIT: "main" })).toThrow(
      "  - BELLWETHER_COMMIT: BELLWETHER_COMMIT must be a git commit hash (7 to 40 hex digits)",
    );
    // The app's full environment checks it too.
    expect(() => parseEnv({ ...valid, BELLWETHER_COMMIT: "v1.0" })).toThrow("BELLWETHER_COMMIT");
  });
});
