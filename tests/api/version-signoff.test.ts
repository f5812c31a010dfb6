import { execFileSync } from "node:child_process";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { createUser } from "@/db/queries/users";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";
import { generatedRows, donorCsv, openStudy, sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** What a move may write; a refused move leaves every count as it was. */
const TABLES = ["interval_versions", "interval_partitions", "signatures", "audit_events", "outbox", "signing_failures"];
const counts = () => tableCounts(pool, TABLES);

// A code of our own, so that signing here never touches the demo's versions in force.
const CODE = `SG${Date.now().toString(36).slice(-6).toUpperCase()}`;
const PASSWORD = "signing-test-password-1";
let cookies: Cookies;
let send: ReturnType<typeof sender>;
let studyId: string;
let estimateId: string;

/** Two more directors, each signed in once: "second" signs what the demo director may not, "locked" is locked out. */
const directors = {} as Record<"second" | "third" | "locked", { id: string; email: string; name: string; cookie: string }>;
const demoDirector = demoUser("director");
const scientist = demoUser("scientist");

function post(path: string, cookie: string, body?: unknown): Promise<Response> {
  const headers: Record<string, string> = { cookie };
  if (body !== undefined) headers["content-type"] = "application/json";
  return fetch(`${BASE_URL}${path}`, { method: "POST", headers, body: body === undefined ? undefined : JSON.stringify(body) });
}

async function problem(res: Response): Promise<{ status: number; detail: string }> {
  expect(res.headers.get("content-type")).toBe("application/problem+json");
  return { status: res.status, detail: (await res.json()).detail };
}

async function ok(res: Response): Promise<Doc> {
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(200);
  return body;
}

/** A new draft of our analyte, drafted by `role` (scientist unless said). */
async function draft(cookie?: string): Promise<Doc> {
  const res = await fetch(`${BASE_URL}/api/v1/interval-versions`, {
    method: "POST",
    headers: { cookie: cookie ?? cookies.scientist, "content-type": "application/json" },
    body: JSON.stringify({ analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] }),
  });
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(201);
  return body;
}

const submit = (id: string, cookie = cookies.scientist) => post(`/api/v1/interval-versions/${id}/submit`, cookie);
const sign = (id: string, cookie: string, body: Doc) => post(`/api/v1/interval-versions/${id}/sign`, cookie, { meaning: "approved_for_clinical_use", ...body });

async function awaiting(): Promise<Doc> {
  const v = await draft();
  return ok(await submit(v.id));
}

async function outboxOf(entityId: string, kind: string): Promise<{ recipients: string[]; subject: string; text: string }[]> {
  return (await pool.query("SELECT recipients, subject, text FROM outbox WHERE entity_id = $1 AND kind = $2 ORDER BY created_at", [entityId, kind])).rows;
}

/** Distinct contact e-mails of the LIS connections not revoked: each gets its own "version.in_force" or "version.withdrawn". */
async function lisContacts(): Promise<number> {
  return (await pool.query("SELECT count(DISTINCT lower(trim(contact_email)))::int AS n FROM lis_connections WHERE revoked_at IS NULL")).rows[0].n;
}

async function activeEmails(role: string): Promise<string[]> {
  return (await pool.query("SELECT email FROM users WHERE role = $1 AND active ORDER BY email", [role])).rows.map((r) => r.email);
}

/** `printf '%s' TEXT | sha256sum`: the hash computed by a tool outside Bellwether. */
function sha256sum(text: string): string {
  return execFileSync("sha256sum", { input: Buffer.from(text, "utf8") }).toString().split(" ")[0];
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  for (const key of ["second", "third", "locked"] as const) {
    const email = `${key}.director.${Date.now()}.${Math.floor(Math.random() * 1e6)}@integration.example`;
    const user = await createUser(database, { input: { email, name: `Dr ${key} Signer`, role: "director", password: PASSWORD }, actor: SYSTEM_ACTOR });
    directors[key] = { id: user.id, email, name: user.name, cookie: await signInOverHttp(email, PASSWORD) };
  }
  const created = await send("POST", "/api/v1/analytes", "scientist", {
    code: CODE, name: `Signing test ${CODE}`, unit: "mmol/L", decimals: 2, specimen: "serum", reviewMonths: 12,
  });
  expect(created.status, await created.clone().text()).toBe(201);
  studyId = await openStudy(send, `Sign-off study ${CODE}`, "scientist", CODE);
  await uploadAndCommit(cookies, studyId, donorCsv(generatedRows(150, 77)));
  const estimated = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { outliers: "none", seed: 3 });
  expect(estimated.status).toBe(201);
  estimateId = (await estimated.json()).id;
}, 120_000);

describe("POST /api/v1/interval-versions/{id}/submit", () => {
  it("moves a draft to awaiting sign-off, audits it and tells every other active director", async () => {
    const v = await draft();
    const before = await counts();
    const body = await ok(await submit(v.id));
    expect(body).toMatchObject({
      id: v.id, state: "awaiting_signoff", submittedAt: expect.any(String),
      submittedBy: { id: expect.any(String), name: scientist.name }, signatures: [], reviewBy: null, withdrawnReason: null,
    });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1, outbox: before.outbox + 1 });
    const [mail] = await outboxOf(v.id, "version.submitted");
    expect(mail.recipients.sort()).toEqual(await activeEmails("director"));
    expect(mail.subject).toBe(`Bellwether: ${CODE} version ${v.number} awaits sign-off`);
  });

  it("leaves out the submitter when a director submits", async () => {
    const v = await draft();
    await ok(await submit(v.id, directors.third.cookie));
    const [mail] = await outboxOf(v.id, "version.submitted");
    expect(mail.recipients.sort()).toEqual((await activeEmails("director")).filter((e) => e !== directors.third.email));
  });

  it("refuses a version that is not a draft (409), and editing it afterwards, changing nothing", async () => {
    const v = await awaiting();
    const before = await counts();
    expect(await problem(await submit(v.id))).toEqual({
      status: 409, detail: `Version ${v.number} of ${CODE} is awaiting sign-off: only a draft can be submitted for sign-off.`,
    });
    expect(await problem(await send("PATCH", `/api/v1/interval-versions/${v.id}`, "scientist", { note: "late change" }))).toEqual({
      status: 409, detail: `Version ${v.number} of ${CODE} is awaiting sign-off: only a draft can be changed.`,
    });
    expect(await counts()).toEqual(before);
  });

  it("is for directors and scientists only (DESIGN.md's roles table)", async () => {
    const v = await draft();
    const before = await counts();
    for (const role of ["admin", "clinician"] as const) {
      expect(await problem(await submit(v.id, cookies[role]))).toEqual({ status: 403, detail: `Your role (${role}) may not do this.` });
    }
    expect(await counts()).toEqual(before);
  });
});

describe("POST /api/v1/interval-versions/{id}/return", () => {
  it("returns a version to draft with the director's comment and tells the author", async () => {
    const v = await awaiting();
    const before = await counts();
    const body = await ok(await post(`/api/v1/interval-versions/${v.id}/return`, cookies.director, { comment: "Explain the two low donors." }));
    expect(body).toMatchObject({
      state: "draft", returnComment: "Explain the two low donors.", returnedAt: expect.any(String),
      returnedBy: { id: expect.any(String), name: demoDirector.name }, submittedBy: null,
    });
    expect(await counts()).toEqual({ ...before, interval_versions: before.interval_versions, audit_events: before.audit_events + 1, outbox: before.outbox + 1 });
    const [mail] = await outboxOf(v.id, "version.returned");
    expect(mail.recipients).toEqual([scientist.email]);
    expect(mail.text).toContain("Explain the two low donors.");
    // The author revises and submits again.
    expect((await ok(await send("PATCH", `/api/v1/interval-versions/${v.id}`, "scientist", { note: "Two donors re-checked." }))).note).toBe("Two donors re-checked.");
    expect((await ok(await submit(v.id))).state).toBe("awaiting_signoff");
  });

  it("needs a comment (422) and refuses scientists (403) and a director who submitted it (403)", async () => {
    const v = await draft();
    await ok(await submit(v.id, directors.second.cookie));
    const before = await counts();
    const empty = await post(`/api/v1/interval-versions/${v.id}/return`, cookies.director, { comment: "  " });
    expect(empty.status).toBe(422);
    expect(await problem(await post(`/api/v1/interval-versions/${v.id}/return`, cookies.scientist, { comment: "x" }))).toEqual({
      status: 403, detail: "Your role (scientist) may not do this.",
    });
    expect(await problem(await post(`/api/v1/interval-versions/${v.id}/return`, directors.second.cookie, { comment: "x" }))).toEqual({
      status: 403,
      detail: `You submitted version ${v.number} of ${CODE}: another director must return it (a director never signs off, returns or withdraws a version they drafted, revised or submitted).`,
    });
    expect(await counts()).toEqual(before);
  });
});

describe("POST /api/v1/interval-versions/{id}/sign", () => {
  let first: Doc;
  let signed: Doc;

  it("asks for the e-mail at the first signature of a session, changing nothing", async () => {
    first = await awaiting();
    const before = await counts();
    expect(await problem(await sign(first.id, cookies.director, { password: demoDirector.password }))).toEqual({
      status: 403, detail: "Your first signature in this session needs your e-mail as well as your password.",
    });
    expect(await counts()).toEqual(before);
  });

  it("puts the version in force, signed, with the hash of its canonical content", async () => {
    const before = await counts();
    const prior = (await pool.query("SELECT v.id FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'", [CODE])).rows;
    signed = await ok(await sign(first.id, cookies.director, { password: demoDirector.password, email: demoDirector.email }));
    expect(signed).toMatchObject({
      state: "in_force",
      effectiveFrom: expect.any(String),
      signatures: [
        {
          id: expect.any(String), signer: { id: expect.any(String), name: demoDirector.name }, at: signed.effectiveFrom,
          meaning: "approved_for_clinical_use", meaningLabel: "Approved for clinical use", contentSha256: expect.stringMatching(/^[0-9a-f]{64}$/), comment: null,
        },
      ],
    });
    // reviewBy: the analyte's review period (12 months) after signing, same day and time.
    const from = new Date(signed.effectiveFrom);
    const review = new Date(from);
    review.setUTCMonth(review.getUTCMonth() + 12);
    expect(signed.reviewBy).toBe(review.toISOString());
    expect(await counts()).toEqual({
      ...before, signatures: before.signatures + 1, audit_events: before.audit_events + 2 + prior.length, outbox: before.outbox + 1 + (await lisContacts()),
    });
    // Anyone with donors:read can recompute the hash; sha256sum agrees with it.
    const content = await ok(await send("GET", `/api/v1/interval-versions/${first.id}/canonical-content`, "scientist"));
    expect(content.contentSha256).toBe(signed.signatures[0].contentSha256);
    expect(sha256sum(content.canonicalContent)).toBe(signed.signatures[0].contentSha256);
    expect(JSON.parse(content.canonicalContent)).toMatchObject({ analyte: { code: CODE, unit: "mmol/L" }, number: first.number, format: "bellwether.interval-version.v1" });
    const [stored] = (await pool.query("SELECT canonical_content, session_id FROM signatures WHERE id = $1", [signed.signatures[0].id])).rows;
    expect(stored.canonical_content).toBe(content.canonicalContent);
    const [mail] = await outboxOf(first.id, "version.signed");
    expect(mail.recipients).toEqual([scientist.email]);
  });

  it("asks for the password alone at later signatures of the session, and supersedes the version in force", async () => {
    const next = await awaiting();
    const body = await ok(await sign(next.id, cookies.director, { password: demoDirector.password }));
    expect(body.state).toBe("in_force");
    const old = await ok(await send("GET", `/api/v1/interval-versions/${first.id}`, "scientist"));
    expect(old).toMatchObject({ state: "superseded", effectiveTo: body.effectiveFrom });
    const inForce = (await pool.query("SELECT v.id FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'", [CODE])).rows;
    expect(inForce).toEqual([{ id: next.id }]);
  });

  it("refuses a version not awaiting sign-off (409) and the scientist (403), changing nothing", async () => {
    const d = await draft();
    const before = await counts();
    expect(await problem(await sign(d.id, cookies.director, { password: demoDirector.password }))).toEqual({
      status: 409, detail: `Version ${d.number} of ${CODE} is draft: only a version awaiting sign-off can be signed off.`,
    });
    expect(await problem(await sign(first.id, cookies.director, { password: demoDirector.password }))).toEqual({
      status: 409, detail: `Version ${first.number} of ${CODE} is superseded: only a version awaiting sign-off can be signed off.`,
    });
    expect(await problem(await sign(d.id, cookies.scientist, { password: scientist.password }))).toEqual({ status: 403, detail: "Your role (scientist) may not do this." });
    const meaning = await sign(d.id, cookies.director, { password: demoDirector.password, meaning: "reviewed_still_valid" });
    expect(meaning.status).toBe(422);
    expect(await counts()).toEqual(before);
  });

  it("keeps duties apart: a director never signs a version they drafted, revised or submitted (403)", async () => {
    const rule = "(a director never signs off, returns or withdraws a version they drafted, revised or submitted)";
    const drafted = await draft(directors.second.cookie);
    await ok(await submit(drafted.id));
    const revised = await draft();
    const patched = await fetch(`${BASE_URL}/api/v1/interval-versions/${revised.id}`, {
      method: "PATCH", headers: { cookie: directors.second.cookie, "content-type": "application/json" }, body: JSON.stringify({ note: "Revised by the second director." }),
    });
    expect(patched.status).toBe(200);
    await ok(await submit(revised.id));
    const submitted = await draft();
    await ok(await submit(submitted.id, directors.second.cookie));
    const before = await counts();
    const credentials = { password: PASSWORD, email: directors.second.email };
    expect(await problem(await sign(drafted.id, directors.second.cookie, credentials))).toEqual({
      status: 403, detail: `You drafted and last revised version ${drafted.number} of ${CODE}: another director must sign it off ${rule}.`,
    });
    expect(await problem(await sign(revised.id, directors.second.cookie, credentials))).toEqual({
      status: 403, detail: `You last revised version ${revised.number} of ${CODE}: another director must sign it off ${rule}.`,
    });
    expect(await problem(await sign(submitted.id, directors.second.cookie, credentials))).toEqual({
      status: 403, detail: `You submitted version ${submitted.number} of ${CODE}: another director must sign it off ${rule}.`,
    });
    expect(await counts()).toEqual(before);
    // Another director may.
    expect((await ok(await sign(submitted.id, directors.third.cookie, { password: PASSWORD, email: directors.third.email }))).state).toBe("in_force");
  });

  it("refuses (409) a version whose unit or decimals no longer match the analyte's", async () => {
    const v = await awaiting();
    const d = await draft();
    // Changed behind the API's back (the API refuses it once a version has left draft).
    await pool.query("UPDATE analytes SET decimals = 3 WHERE code = $1", [CODE]);
    try {
      const before = await counts();
      const detail = (n: number) => `Version ${n} of ${CODE} states its limits in mmol/L with 2 decimals, but ${CODE} is now in mmol/L with 3 decimals: draft a new version.`;
      expect(await problem(await sign(v.id, cookies.director, { password: demoDirector.password }))).toEqual({ status: 409, detail: detail(v.number) });
      expect(await problem(await submit(d.id))).toEqual({ status: 409, detail: detail(d.number) });
      expect(await counts()).toEqual(before);
    } finally {
      await pool.query("UPDATE analytes SET decimals = 2 WHERE code = $1", [CODE]);
    }
  });

  it("reads the signer's authority from the database at the moment of signing", async () => {
    const v = await awaiting();
    // The role changes in the database while the session (its version unchanged) lives on.
    await pool.query("UPDATE users SET role = 'scientist' WHERE id = $1", [directors.third.id]);
    try {
      const before = await counts();
      expect(await problem(await sign(v.id, directors.third.cookie, { password: PASSWORD }))).toEqual({ status: 403, detail: "Your role (scientist) may not do this." });
      expect(await counts()).toEqual(before);
    } finally {
      await pool.query("UPDATE users SET role = 'director' WHERE id = $1", [directors.third.id]);
    }
  });

  it("makes exactly one of two simultaneous signings of one analyte win; the other answers 409", async () => {
    const a = await awaiting();
    const b = await awaiting();
    const [{ id: inForce }] = (await pool.query("SELECT v.id FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'", [CODE])).rows;
    // Hold the version in force so that both signings reach the moment of superseding it together.
    const holder = await pool.connect();
    let answers: Response[];
    const before = await counts();
    try {
      await holder.query("BEGIN");
      await holder.query("SELECT id FROM interval_versions WHERE id = $1 FOR UPDATE", [inForce]);
      const pending = Promise.all([
        sign(a.id, cookies.director, { password: demoDirector.password }),
        sign(b.id, directors.second.cookie, { password: PASSWORD, email: directors.second.email }),
      ]);
      for (let waiting = 0; waiting < 2; ) {
        await new Promise((r) => setTimeout(r, 50));
        waiting = (await pool.query("SELECT count(*)::int AS n FROM pg_stat_activity WHERE wait_event_type = 'Lock' AND datname = current_database() AND query LIKE 'update \"interval_versions\"%'")).rows[0].n;
      }
      await holder.query("COMMIT");
      answers = await pending;
    } finally {
      holder.release();
    }
    const statuses = answers.map((r) => r.status).sort();
    expect(statuses).toEqual([200, 409]);
    const refused = answers.find((r) => r.status === 409)!;
    expect((await refused.json()).detail).toBe(
      `Another version of ${CODE} was put in force at the same moment: only one version of an analyte can be in force. Reload and review what is in force now.`,
    );
    const states = (await pool.query("SELECT id, state::text FROM interval_versions WHERE id = ANY($1) ORDER BY state", [[a.id, b.id, inForce]])).rows;
    expect(states.filter((s) => s.state === "in_force")).toHaveLength(1);
    expect(states.filter((s) => s.state === "awaiting_signoff")).toHaveLength(1);
    expect(states.find((s) => s.id === inForce)!.state).toBe("superseded");
    // The losing signature was rolled back with its transaction.
    expect((await counts()).signatures).toBe(before.signatures + 1);
  });
});

describe("POST /api/v1/interval-versions/{id}/review", () => {
  it("signs a review of a version in force and sets the next review-by date", async () => {
    const v = await awaiting();
    await ok(await sign(v.id, directors.third.cookie, { password: PASSWORD }));
    const before = await counts();
    const body = await ok(await post(`/api/v1/interval-versions/${v.id}/review`, cookies.director, { password: demoDirector.password, comment: "Population and method unchanged." }));
    expect(body.signatures.map((s: Doc) => [s.meaning, s.meaningLabel, s.comment])).toEqual([
      ["approved_for_clinical_use", "Approved for clinical use", null],
      ["reviewed_still_valid", "Reviewed: still valid", "Population and method unchanged."],
    ]);
    const review = new Date(body.signatures[1].at);
    review.setUTCMonth(review.getUTCMonth() + 12);
    expect(body.reviewBy).toBe(review.toISOString());
    expect(body.signatures[1].contentSha256).toBe(body.signatures[0].contentSha256);
    expect(await counts()).toEqual({ ...before, signatures: before.signatures + 1, audit_events: before.audit_events + 2 });
  });

  it("is for versions in force only (409)", async () => {
    const v = await awaiting();
    const before = await counts();
    expect(await problem(await post(`/api/v1/interval-versions/${v.id}/review`, cookies.director, { password: demoDirector.password, comment: "x" }))).toEqual({
      status: 409, detail: `Version ${v.number} of ${CODE} is awaiting sign-off: only a version in force can be reviewed.`,
    });
    expect(await counts()).toEqual(before);
  });
});

describe("POST /api/v1/interval-versions/{id}/withdraw", () => {
  it("withdraws a version in force and reinstates the previous one with a new signature", async () => {
    const previous = await awaiting();
    await ok(await sign(previous.id, cookies.director, { password: demoDirector.password }));
    const current = await awaiting();
    await ok(await sign(current.id, cookies.director, { password: demoDirector.password }));
    const before = await counts();
    const body = await ok(await post(`/api/v1/interval-versions/${current.id}/withdraw`, directors.third.cookie, {
      password: PASSWORD, reason: "Calibration error found in the study's analyser.", reinstatePrevious: true,
    }));
    expect(body).toMatchObject({
      state: "withdrawn", withdrawnReason: "Calibration error found in the study's analyser.", withdrawnBy: { id: directors.third.id, name: directors.third.name },
    });
    expect(body.signatures.at(-1)).toMatchObject({ meaning: "withdrawn_from_use", meaningLabel: "Withdrawn from use", signer: { id: directors.third.id } });
    const back = await ok(await send("GET", `/api/v1/interval-versions/${previous.id}`, "scientist"));
    expect(back).toMatchObject({ state: "in_force", effectiveTo: null, effectiveFrom: body.withdrawnAt });
    expect(back.signatures.map((s: Doc) => s.meaning)).toEqual(["approved_for_clinical_use", "approved_for_clinical_use"]);
    expect(await counts()).toEqual({ ...before, signatures: before.signatures + 2, audit_events: before.audit_events + 4, outbox: before.outbox + 1 + (await lisContacts()) });
    const [mail] = await outboxOf(current.id, "version.withdrawn");
    expect(mail.recipients.sort()).toEqual([...(await activeEmails("director")), ...(await activeEmails("scientist"))].sort());
  });

  it("without reinstatement leaves no version of the analyte in force", async () => {
    const [{ id }] = (await pool.query("SELECT v.id FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'", [CODE])).rows;
    const before = await counts();
    await ok(await post(`/api/v1/interval-versions/${id}/withdraw`, directors.third.cookie, { password: PASSWORD, reason: "Method discontinued." }));
    expect((await pool.query("SELECT count(*)::int AS n FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'", [CODE])).rows[0].n).toBe(0);
    expect(await counts()).toEqual({ ...before, signatures: before.signatures + 1, audit_events: before.audit_events + 2, outbox: before.outbox + 1 + (await lisContacts()) });
    const directorsNow = await activeEmails("director");
    const mail = (await outboxOf(id, "version.withdrawn")).find((m) => m.recipients.includes(directorsNow[0]))!;
    expect(mail.text).toContain(`No interval of ${CODE} is in force now`);
    // A withdrawn version stays withdrawn.
    expect(await problem(await post(`/api/v1/interval-versions/${id}/withdraw`, directors.third.cookie, { password: PASSWORD, reason: "again" }))).toEqual({
      status: 409, detail: expect.stringContaining("is withdrawn: only a version in force can be withdrawn."),
    });
  });
});

describe("failed signings lock signing for the account", () => {
  it("counts wrong passwords, locks at the fifth, alerts the admins, and an admin unlocks", async () => {
    const v = await awaiting();
    const me = directors.locked;
    for (let i = 1; i <= 4; i++) {
      const before = await counts();
      const left = 5 - i;
      expect(await problem(await sign(v.id, me.cookie, { password: "wrong password", email: me.email }))).toEqual({
        status: 403, detail: `Signing refused: the e-mail or password is not right. ${left} attempt${left === 1 ? "" : "s"} left before signing locks for your account.`,
      });
      expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1, signing_failures: before.signing_failures + (i === 1 ? 1 : 0) });
    }
    // The right password with a wrong e-mail is a failure too: the fifth locks.
    const before = await counts();
    expect(await problem(await sign(v.id, me.cookie, { password: PASSWORD, email: "someone.else@integration.example" }))).toEqual({
      status: 403,
      detail: "Signing refused: the e-mail or password is not right. Signing is locked for your account after 5 failed attempts: an administrator must unlock it.",
    });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 2, outbox: before.outbox + 1 });
    const [alert] = (await pool.query("SELECT recipients, subject FROM outbox WHERE kind = 'signing.locked' AND entity_id = $1", [me.id])).rows;
    expect(alert.recipients.sort()).toEqual(await activeEmails("admin"));
    expect(alert.subject).toBe(`Bellwether: signing locked for ${me.name}`);
    // Locked: even the right credentials are refused, and nothing is counted.
    const locked = await counts();
    expect(await problem(await sign(v.id, me.cookie, { password: PASSWORD, email: me.email }))).toEqual({
      status: 403, detail: "Signing is locked for your account after 5 failed attempts: an administrator must unlock it.",
    });
    expect(await counts()).toEqual(locked);
    // Only an admin unlocks.
    expect(await problem(await post(`/api/v1/users/${me.id}/signing-unlock`, cookies.director))).toEqual({ status: 403, detail: "Your role (director) may not do this." });
    const unlocked = await ok(await post(`/api/v1/users/${me.id}/signing-unlock`, cookies.admin));
    expect(unlocked).toEqual({ user: { id: me.id, name: me.name, email: me.email }, signingLocked: false, wasLocked: true });
    expect((await ok(await sign(v.id, me.cookie, { password: PASSWORD, email: me.email }))).state).toBe("in_force");
    const [row] = (await pool.query("SELECT failures, locked_at FROM signing_failures WHERE user_id = $1", [me.id])).rows;
    expect(row).toEqual({ failures: 0, locked_at: null });
  });

  it("answers 404 for an unknown user", async () => {
    expect(await problem(await post("/api/v1/users/00000000-0000-4000-8000-000000000000/signing-unlock", cookies.admin))).toEqual({
      status: 404, detail: "There is no user with the id 00000000-0000-4000-8000-000000000000.",
    });
  });
});
