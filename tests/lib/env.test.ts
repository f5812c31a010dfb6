import { describe, expect, it } from "vitest";
import { demoMode, parseEnv, parseStartEnv } from "@/lib/env";

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
    // Not a demo unless asked: the demo's published passwords are refused by default.
    expect(env.BELLWETHER_DEMO).toBe(false);
    expect(parseEnv({ ...valid, BELLWETHER_DEMO: "1" }).BELLWETHER_DEMO).toBe(true);
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

describe("parseStartEnv and demo mode", () => {
  const external = "postgres://bellwether_app:pw@db.example:5432/bellwether";
  const owner = "postgres://bellwether_owner:pw@db.example:5432/bellwether";

  it("uses the private PostgreSQL with the demo when nothing is given", () => {
    const settings = parseStartEnv({});
    expect(settings).toEqual({ PORT: 3000, BELLWETHER_DATA_DIR: ".data", BELLWETHER_PG_PORT: 54329 });
    expect(demoMode(settings)).toBe(true);
  });

  it("seeds no demo into a database given by DATABASE_URL unless BELLWETHER_DEMO=1", () => {
    expect(demoMode(parseStartEnv({ DATABASE_URL: external }))).toBe(false);
    expect(demoMode(parseStartEnv({ DATABASE_URL: external, BELLWETHER_MIGRATION_URL: owner }))).toBe(false);
    expect(demoMode(parseStartEnv({ DATABASE_URL: external, BELLWETHER_DEMO: "1" }))).toBe(true);
    expect(demoMode(parseStartEnv({ BELLWETHER_DEMO: "0" }))).toBe(false);
  });

  it("refuses a migration URL without DATABASE_URL, and a demo flag other than 0 or 1", () => {
    expect(() => parseStartEnv({ BELLWETHER_MIGRATION_URL: owner, BELLWETHER_DEMO: "yes" })).toThrow(
      [
        "Bellwether cannot start, the environment is not valid:",
        "  - BELLWETHER_DEMO: BELLWETHER_DEMO must be 1 (demo) or 0",
      ].join("\n"),
    );
    expect(() => parseStartEnv({ BELLWETHER_MIGRATION_URL: owner })).toThrow(
      "  - BELLWETHER_MIGRATION_URL: BELLWETHER_MIGRATION_URL is set but DATABASE_URL is not; give both, or neither for the private PostgreSQL",
    );
    expect(() => parseStartEnv({ DATABASE_URL: external, BELLWETHER_MIGRATION_URL: "mysql://x" })).toThrow(
      "  - BELLWETHER_MIGRATION_URL: BELLWETHER_MIGRATION_URL must be a postgres:// connection string",
    );
  });
});
