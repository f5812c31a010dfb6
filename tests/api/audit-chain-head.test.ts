import { execFile } from "node:child_process";
import path from "node:path";
import { promisify } from "node:util";
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { BASE_URL } from "../support/http-session";
import { appUrl, queryRows } from "../support/scratch-database";
import { sender, signInAll, type Cookies } from "../support/studies";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");

const { pool } = testDatabase();
afterAll(() => pool.end());

let cookies: Cookies;
let versionId: string;

beforeAll(async () => {
  cookies = await signInAll();
  // A demo version in force (db/demo-studies.ts signs version 1 of several analytes).
  const [row] = await queryRows<{ id: string }>(appUrl(), "SELECT id FROM interval_versions WHERE state = 'in_force' ORDER BY number, id LIMIT 1");
  versionId = row.id;
});

async function linkAt(position: number): Promise<{ eventId: string; hash: string }> {
  const [row] = await queryRows<{ eventId: string; hash: string }>(appUrl(), `SELECT event_id::text AS "eventId", hash FROM audit_chain WHERE position = ${position}`);
  return row;
}

describe("the audit chain's head in each dossier and sign-off record", () => {
  it("the dossier's Summary carries the head at export, which verify-audit then checks", async () => {
    const res = await sender(cookies)("GET", `/api/v1/interval-versions/${versionId}/dossier`, "director");
    expect(res.status).toBe(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(await res.arrayBuffer());
    const rows: unknown[][] = [];
    workbook.getWorksheet("Summary")!.eachRow((row) => rows.push((row.values as unknown[]).slice(1)));
    const field = (name: string) => rows.find((r) => r[0] === name)?.[1] as string | undefined;

    const [, position, eventId] = /^Link (\d+), audit event (\d+)$/.exec(field("Audit chain head") ?? "")!;
    const link = await linkAt(Number(position));
    expect(link.eventId).toBe(eventId);
    expect(field("Audit chain head SHA-256")).toBe(link.hash);
    expect(field("Check the audit trail against it")).toBe(`npm run -s bellwether -- verify-audit --head ${position}:${link.hash}`);

    // The export's own audit event was written after that head was read.
    const [exported] = await queryRows<{ id: string; head: unknown }>(
      appUrl(),
      `SELECT id::text, details->'auditChainHead' AS head FROM audit_events WHERE action = 'interval_version.dossier_exported' AND entity_id = '${versionId}' ORDER BY id DESC LIMIT 1`,
    );
    expect(Number(exported.id)).toBeGreaterThan(Number(eventId));
    // The export's audit event names the head it handed out.
    expect(exported.head).toEqual({ position: Number(position), eventId, hash: link.hash });

    const { stdout } = await exec(TSX, ["scripts/bellwether.ts", "verify-audit", "--head", `${position}:${link.hash}`], { cwd: ROOT, env: { ...process.env, DATABASE_URL: appUrl() } });
    expect(stdout).toMatch(/^audit trail intact: /);
  });

  it("the printed sign-off record shows the head and the command that checks it", async () => {
    const res = await fetch(`${BASE_URL}/versions/${versionId}/record`, { headers: { cookie: cookies.director } });
    expect(res.status).toBe(200);
    const html = (await res.text()).replaceAll("<!-- -->", "");
    const found = /link (\d+), audit event (\d+)/.exec(html)!;
    const link = await linkAt(Number(found[1]));
    expect(link.eventId).toBe(found[2]);
    expect(html).toContain("Audit trail at printing");
    expect(html).toContain(`npm run -s bellwether -- verify-audit --head ${found[1]}:${link.hash}`);
  });
});
