import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: the catalogue is read by everyone signed in, kept by the lab roles. */
const MAY_WRITE: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

const cookies = {} as Record<Role, string>;
beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
});

/** A code no other test (or run) uses: capital letters and digits. */
function uniqueCode(prefix: string): string {
  return `${prefix}${Date.now().toString(36).toUpperCase()}${Math.floor(Math.random() * 1296).toString(36).toUpperCase()}`.slice(0, 16);
}

function send(method: string, path: string, role: Role | null, body?: unknown): Promise<Response> {
  const headers: Record<string, string> = {};
  if (role) headers.cookie = cookies[role];
  if (body !== undefined) headers["content-type"] = "application/json";
  return fetch(`${BASE_URL}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
}

/** Every row of the tables a write touches, to show that a refused request changed nothing. */
async function snapshot(): Promise<{ analytes: unknown[]; audit: number }> {
  const analytes = (await pool.query("SELECT * FROM analytes ORDER BY code")).rows;
  const [{ n }] = (await pool.query("SELECT count(*)::int AS n FROM audit_events")).rows;
  return { analytes, audit: n };
}

const glucose = (code: string) => ({
  code,
  name: "Glucose (test)",
  unit: "mmol/L",
  decimals: 1,
  loinc: "14749-6",
  specimen: "plasma",
  criticalLow: 2.5,
  criticalHigh: 25,
  molarMass: 180.156,
  molarMassSource: "Young DS, Ann Intern Med 1987;106:114-129",
});

describe("GET /api/v1/analytes", () => {
  it("answers an anonymous caller 401", async () => {
    const res = await send("GET", "/api/v1/analytes", null);
    expect(res.status).toBe(401);
    expect((await res.json()).detail).toBe("Sign in to continue.");
  });

  for (const role of ROLES) {
    it(`lists the catalogue, with every field, for the ${role}`, async () => {
      const res = await send("GET", "/api/v1/analytes", role);
      expect(res.status).toBe(200);
      const { analytes } = await res.json();
      // The demo's glucose, as db/seed.ts puts it in (LOINC 14749-6: glucose, moles/volume).
      expect(analytes.find((a: { code: string }) => a.code === "GLU")).toMatchObject({
        code: "GLU",
        name: "Glucose",
        unit: "mmol/L",
        decimals: 1,
        loinc: "14749-6",
        specimen: "plasma",
        criticalLow: 2.5,
        criticalHigh: 25,
        reviewMonths: 24,
        molarMass: 180.156,
      });
      expect(Object.keys(analytes[0]).sort()).toEqual(
        [
          "code", "createdAt", "createdBy", "criticalHigh", "criticalLow", "decimals", "id", "loinc", "molarMass",
          "molarMassSource", "name", "reviewMonths", "specimen", "unit", "updatedAt", "updatedBy",
        ].sort(),
      );
    });
  }
});

describe("POST /api/v1/analytes", () => {
  for (const role of ROLES) {
    it(`${MAY_WRITE[role] ? "lets" : "refuses"} the ${role} ${MAY_WRITE[role] ? "add" : "adding"} an analyte`, async () => {
      const code = uniqueCode(role.slice(0, 2).toUpperCase());
      const before = await snapshot();
      const res = await send("POST", "/api/v1/analytes", role, glucose(code));
      if (MAY_WRITE[role]) {
        expect(res.status).toBe(201);
        expect(res.headers.get("location")).toBe(`/api/v1/analytes/${code}`);
        expect(await res.json()).toMatchObject({ ...glucose(code), reviewMonths: 24 });
        const [event] = (
          await pool.query("SELECT actor_label, action, details FROM audit_events WHERE entity_type = 'analyte' AND entity_id = $1", [code])
        ).rows;
        expect(event).toMatchObject({ actor_label: demoUser(role).email, action: "analyte.created" });
        expect(event.details).toMatchObject({ unit: "mmol/L", decimals: 1, loinc: "14749-6" });
      } else {
        expect(res.status).toBe(403);
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
        expect(await snapshot()).toEqual(before);
      }
    });
  }

  it("fills in the specimen and the review period when they are left out", async () => {
    const code = uniqueCode("MIN");
    const res = await send("POST", "/api/v1/analytes", "scientist", { code, name: "Alanine aminotransferase", unit: "U/L", decimals: 0 });
    expect(res.status).toBe(201);
    expect(await res.json()).toMatchObject({ code, specimen: "serum", reviewMonths: 24, loinc: null, criticalLow: null, molarMass: null });
  });

  it("answers 409 for a code that exists, and changes nothing", async () => {
    const before = await snapshot();
    const res = await send("POST", "/api/v1/analytes", "director", glucose("GLU"));
    expect(res.status).toBe(409);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect((await res.json()).detail).toBe("An analyte with the code GLU already exists; edit it, or choose another code.");
    expect(await snapshot()).toEqual(before);
  });

  const invalid: [string, Record<string, unknown>, string][] = [
    // LOINC Users' Guide 12 C: 2345's check digit is 7.
    ["a LOINC code with a wrong check digit", { loinc: "2345-8" }, "loinc: The check digit of LOINC code 2345-8 is wrong: for 2345 it is 7. Check the code against the LOINC database."],
    ["a unit that is not UCUM", { unit: "mmol/litre" }, 'unit: "mmol/litre" is not a UCUM unit.'],
    ["decimals above 6", { decimals: 7 }, "decimals: Display decimals must be a whole number from 0 to 6."],
    ["decimals below 0", { decimals: -1 }, "decimals: Display decimals must be a whole number from 0 to 6."],
    ["a critical low equal to the high", { criticalLow: 25, criticalHigh: 25 }, "criticalHigh: The critical low limit (25) must be below the critical high limit (25)."],
    ["a critical low above the high", { criticalLow: 30, criticalHigh: 25 }, "criticalHigh: The critical low limit (30) must be below the critical high limit (25)."],
    ["a code in lower case with a hyphen", { code: "glu-2" }, "code: The code is 1 to 16 capital letters or digits, e.g. GLU, K or ALP."],
    ["a molar mass without its source", { molarMassSource: null }, "molarMassSource: Name the published source of the molar mass."],
    ["a field the API does not know", { critcalLow: 2 }, 'Unrecognized key: "critcalLow"'],
  ];
  for (const [what, change, message] of invalid) {
    it(`answers 422 for ${what}, saying so, and changes nothing`, async () => {
      const before = await snapshot();
      const res = await send("POST", "/api/v1/analytes", "scientist", { ...glucose(uniqueCode("BAD")), ...change });
      expect(res.status).toBe(422);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      const problem = await res.json();
      expect(problem.title).toBe("Invalid input");
      expect(problem.detail).toContain(message);
      expect(await snapshot()).toEqual(before);
    });
  }

  it("answers 400 for a body that is not JSON, and changes nothing", async () => {
    const before = await snapshot();
    const res = await fetch(`${BASE_URL}/api/v1/analytes`, {
      method: "POST",
      headers: { cookie: cookies.scientist, "content-type": "application/json" },
      body: '{"code": "GLU2", "name": ',
    });
    expect(res.status).toBe(400);
    expect((await res.json()).detail).toBe("The request body is not valid JSON.");
    expect(await snapshot()).toEqual(before);
  });
});

describe("PATCH /api/v1/analytes/{code}", () => {
  let code: string;
  beforeAll(async () => {
    code = uniqueCode("PT");
    expect((await send("POST", "/api/v1/analytes", "scientist", glucose(code))).status).toBe(201);
  });

  it("changes only the fields sent, and audits each one's before and after", async () => {
    const res = await send("PATCH", `/api/v1/analytes/${code}`, "director", { name: "Glucose, fasting", criticalHigh: 22.2, loinc: null });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ code, name: "Glucose, fasting", criticalLow: 2.5, criticalHigh: 22.2, loinc: null, unit: "mmol/L" });
    const events = (
      await pool.query("SELECT actor_label, details FROM audit_events WHERE action = 'analyte.updated' AND entity_id = $1", [code])
    ).rows;
    expect(events).toEqual([
      {
        actor_label: demoUser("director").email,
        details: {
          changes: {
            name: { from: "Glucose (test)", to: "Glucose, fasting" },
            loinc: { from: "14749-6", to: null },
            criticalHigh: { from: 25, to: 22.2 },
          },
        },
      },
    ]);
  });

  it("accepts a lower-case code in the address", async () => {
    const res = await send("PATCH", `/api/v1/analytes/${code.toLowerCase()}`, "scientist", { reviewMonths: 12 });
    expect(res.status).toBe(200);
    expect((await res.json()).reviewMonths).toBe(12);
  });

  it("checks low below high against the limits already stored", async () => {
    const before = await snapshot();
    const res = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { criticalLow: 30 });
    expect(res.status).toBe(422);
    const problem = await res.json();
    expect(problem.detail).toBe("The critical low limit (30) must be below the critical high limit (22.2).");
    expect(problem.errors).toEqual([{ path: "criticalHigh", message: "The critical low limit (30) must be below the critical high limit (22.2)." }]);
    expect(await snapshot()).toEqual(before);
  });

  it("refuses to change the code", async () => {
    const before = await snapshot();
    const res = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { code: "NEWCODE" });
    expect(res.status).toBe(422);
    expect((await res.json()).detail).toBe("code: An analyte's code cannot change; add a new analyte under the new code instead.");
    expect(await snapshot()).toEqual(before);
  });

  it("answers 422 for an invalid unit and 404 for an unknown code", async () => {
    const bad = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { unit: "MMOL/L" });
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toContain('unit: "MMOL/L" is not a UCUM unit.');
    const missing = await send("PATCH", "/api/v1/analytes/NOSUCHCODE99", "scientist", { name: "x" });
    expect(missing.status).toBe(404);
    expect((await missing.json()).detail).toBe("There is no analyte with the code NOSUCHCODE99.");
  });

  for (const role of ["clinician", "admin"] as const) {
    it(`answers 403 to the ${role}, and changes nothing`, async () => {
      const before = await snapshot();
      const res = await send("PATCH", `/api/v1/analytes/${code}`, role, { name: "Changed by a reader" });
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await snapshot()).toEqual(before);
    });
  }
});
