import { describe, expect, it } from "vitest";
import { demoMode, parseDemoLisEnv, parseEngineEnv, parseEnv, parseStartEnv } from "@/lib/env";

const valid = {
  DATABASE_URL: "postgres://postgres:pw@127.0.0.1:54329/bellwether",
  NEXTAUTH_SECRET: "s".repeat(32),
};

describe("parseEnv", () => {
  it("accepts a complete environment and fills the defaults", () => {
    const env = parseEnv(valid);
    // The defaults the README's environment table states.
    expect(env.BELLWETHER_SIGN_IN_FREE_FAILURES).toBe(3);
    expect(env.BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS).toBe(30);
    expect(env.BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES).toBe(15);
    expect(env.BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES).toBe(30);
    expect(env.BELLWETHER_SIGN_IN_WINDOW_MINUTES).toBe(60);
    expect(env.BELLWETHER_TRUSTED_PROXIES).toEqual([]);
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
    expect(parseEnv({ ...valid, BELLWETHER_SIGN_IN_FREE_FAILURES: "5" }).BELLWETHER_SIGN_IN_FREE_FAILURES).toBe(5);
    expect(() => parseEnv({ ...valid, BELLWETHER_SIGN_IN_WINDOW_MINUTES: "0" })).toThrow("BELLWETHER_SIGN_IN_WINDOW_MINUTES");
    expect(() => parseEnv({ ...valid, BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS: "2.5" })).toThrow("BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS");
  });

  it("refuses the variables of the old per-e-mail lock and names their replacements", () => {
    expect(() => parseEnv({ ...valid, BELLWETHER_SIGN_IN_MAX_FAILURES: "5" })).toThrow(
      "  - BELLWETHER_SIGN_IN_MAX_FAILURES: no longer read; use BELLWETHER_SIGN_IN_FREE_FAILURES and BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES (see the README's environment table)",
    );
    expect(() => parseEnv({ ...valid, BELLWETHER_SIGN_IN_LOCK_MINUTES: "15" })).toThrow(
      "  - BELLWETHER_SIGN_IN_LOCK_MINUTES: no longer read; use BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES and BELLWETHER_SIGN_IN_WINDOW_MINUTES (see the README's environment table)",
    );
  });

  it("reads the mail settings: no key and no base URL by default, a sender address, a 30 s interval", () => {
    // The defaults the README's environment table states.
    const env = parseEnv(valid);
    expect(env.RESEND_API_KEY).toBeUndefined();
    expect(env.RESEND_BASE_URL).toBeUndefined();
    expect(env.MAIL_FROM).toBe("Bellwether <bellwether@localhost>");
    expect(env.BELLWETHER_MAIL_INTERVAL_SECONDS).toBe(30);
    const set = parseEnv({ ...valid, RESEND_API_KEY: "re_123", RESEND_BASE_URL: "http://127.0.0.1:4010/", MAIL_FROM: "lab@harrowmere.example" });
    expect([set.RESEND_API_KEY, set.RESEND_BASE_URL, set.MAIL_FROM]).toEqual(["re_123", "http://127.0.0.1:4010", "lab@harrowmere.example"]);
    expect(() => parseEnv({ ...valid, RESEND_BASE_URL: "fake provider" })).toThrow(
      "  - RESEND_BASE_URL: RESEND_BASE_URL must be a URL such as http://127.0.0.1:4010 (the local fake) or https://api.resend.com",
    );
    expect(() => parseEnv({ ...valid, MAIL_FROM: "Bellwether" })).toThrow('  - MAIL_FROM: MAIL_FROM must be an address, or "Name <address>"');
    expect(() => parseEnv({ ...valid, RESEND_API_KEY: " " })).toThrow("  - RESEND_API_KEY: RESEND_API_KEY must not be empty; leave it unset to keep mail queued");
  });

  it("reads the trusted proxies as addresses and ranges, and names a bad entry", () => {
    expect(parseEnv({ ...valid, BELLWETHER_TRUSTED_PROXIES: "127.0.0.1,10.0.0.0/8" }).BELLWETHER_TRUSTED_PROXIES.map((r) => r.prefix)).toEqual([32, 8]);
    expect(() => parseEnv({ ...valid, BELLWETHER_TRUSTED_PROXIES: "127.0.0.1, proxy.lan" })).toThrow(
      '  - BELLWETHER_TRUSTED_PROXIES: "proxy.lan" is not an IP address or CIDR range; list addresses or CIDR ranges, comma-separated',
    );
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

describe("the demo LIS connection's variables", () => {
  const key = "bwk_test-only-demo-lis-key-for-bellwether-tests";

  it("reads a key of the right form and a whole rate", () => {
    expect(parseDemoLisEnv({})).toEqual({ key: undefined, ratePerMinute: undefined });
    expect(parseDemoLisEnv({ BELLWETHER_DEMO_LIS_KEY: key, BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: "120" })).toEqual({ key, ratePerMinute: 120 });
    expect(parseStartEnv({ BELLWETHER_DEMO_LIS_KEY: key }).BELLWETHER_DEMO_LIS_KEY).toBe(key);
  });

  it("refuses, naming the variable, a key of another form or a rate that is not a whole number from 1", () => {
    expect(() => parseStartEnv({ BELLWETHER_DEMO_LIS_KEY: "secret" })).toThrow(
      'BELLWETHER_DEMO_LIS_KEY must be "bwk_" followed by 43 base64url characters (A-Z, a-z, 0-9, - and _)',
    );
    expect(() => parseDemoLisEnv({ BELLWETHER_DEMO_LIS_KEY: `${key}x` })).toThrow("BELLWETHER_DEMO_LIS_KEY must be");
    expect(() => parseDemoLisEnv({ BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: "0" })).toThrow("BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be at least 1");
    expect(() => parseDemoLisEnv({ BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: "1.5" })).toThrow(
      "BELLWETHER_DEMO_LIS_RATE_PER_MINUTE must be a whole number of requests a minute",
    );
  });
});
