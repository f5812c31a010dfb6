/**
 * A local stand-in for the e-mail provider's HTTP API, on loopback, for development and tests:
 * it accepts what Resend's SDK posts to `POST /emails` (the same path, headers and JSON), answers
 * as the provider does (`{id}`, or `{statusCode, name, message}` with a 4xx/5xx), honours the
 * Idempotency-Key header, and keeps every message in memory and, given a file, as JSON lines.
 * `failNext(n)` (or `POST /_fake/fail {"count": n}`) makes the next n sends fail with a 500.
 * Nothing leaves the machine. Started by `npm start` and the tests; imports nothing of the app.
 */
import crypto from "node:crypto";
import fs from "node:fs";
import http from "node:http";
import path from "node:path";

export interface FakeMessage {
  id: string;
  from: string;
  to: string[];
  subject: string;
  text: string | null;
  html: string | null;
  idempotencyKey: string | null;
  createdAt: string;
}

export interface FakeMailProvider {
  /** The base URL to give the SDK (RESEND_BASE_URL). */
  url: string;
  port: number;
  /** Every accepted message, oldest first. */
  messages(): FakeMessage[];
  /** Fails the next `count` send requests with a 500, as a provider outage would. */
  failNext(count: number): void;
  /** Send requests received, accepted or not. */
  requests(): number;
  close(): Promise<void>;
}

const MAX_BODY = 1 << 20;

function answer(res: http.ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  res.writeHead(status, { "content-type": "application/json", "content-length": Buffer.byteLength(text) });
  res.end(text);
}

function problem(res: http.ServerResponse, statusCode: number, name: string, message: string): void {
  answer(res, statusCode, { statusCode, name, message });
}

function readBody(req: http.IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    let size = 0;
    const chunks: Buffer[] = [];
    req.on("data", (chunk: Buffer) => {
      size += chunk.length;
      if (size > MAX_BODY) {
        reject(new Error("too large"));
        req.destroy();
        return;
      }
      chunks.push(chunk);
    });
    req.on("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
    req.on("error", reject);
  });
}

/** The send request's fields as the provider checks them; a message in words when one is wrong. */
function validateSend(body: unknown): { ok: true; mail: Omit<FakeMessage, "id" | "createdAt" | "idempotencyKey"> } | { ok: false; message: string } {
  if (typeof body !== "object" || body === null) return { ok: false, message: "The request body must be a JSON object." };
  const b = body as Record<string, unknown>;
  if (typeof b.from !== "string" || b.from.trim() === "") return { ok: false, message: "The `from` field is missing." };
  const to = typeof b.to === "string" ? [b.to] : Array.isArray(b.to) ? b.to : null;
  if (!to || to.length === 0 || !to.every((a) => typeof a === "string" && a.includes("@"))) {
    return { ok: false, message: "The `to` field must be an address or a list of addresses." };
  }
  if (to.length > 50) return { ok: false, message: "The `to` field takes at most 50 addresses." };
  if (typeof b.subject !== "string" || b.subject === "") return { ok: false, message: "The `subject` field is missing." };
  const text = typeof b.text === "string" ? b.text : null;
  const html = typeof b.html === "string" ? b.html : null;
  if (text === null && html === null) return { ok: false, message: "Give `text` or `html`." };
  return { ok: true, mail: { from: b.from, to: to as string[], subject: b.subject, text, html } };
}

function loadMessages(file: string | undefined): FakeMessage[] {
  if (!file || !fs.existsSync(file)) return [];
  return fs
    .readFileSync(file, "utf8")
    .split("\n")
    .filter((line) => line.trim() !== "")
    .flatMap((line) => {
      try {
        return [JSON.parse(line) as FakeMessage];
      } catch {
        return [];
      }
    });
}

export async function startFakeMailProvider({ port = 0, file }: { port?: number; file?: string } = {}): Promise<FakeMailProvider> {
  if (file) fs.mkdirSync(path.dirname(file), { recursive: true });
  const stored = loadMessages(file);
  const byKey = new Map(stored.filter((m) => m.idempotencyKey).map((m) => [m.idempotencyKey as string, m]));
  let failures = 0;
  let received = 0;

  const send = async (req: http.IncomingMessage, res: http.ServerResponse) => {
    received += 1;
    const auth = req.headers.authorization ?? "";
    if (!/^Bearer \S+/.test(auth)) return problem(res, 401, "missing_api_key", "Missing API key in the authorization header.");
    if (failures > 0) {
      failures -= 1;
      return problem(res, 500, "internal_server_error", "The local fake provider was told to fail this request.");
    }
    let body: unknown;
    try {
      body = JSON.parse(await readBody(req));
    } catch {
      return problem(res, 422, "validation_error", "The request body is not valid JSON.");
    }
    const checked = validateSend(body);
    if (!checked.ok) return problem(res, 422, "validation_error", checked.message);
    const key = typeof req.headers["idempotency-key"] === "string" ? req.headers["idempotency-key"] : null;
    const earlier = key ? byKey.get(key) : undefined;
    if (earlier) return answer(res, 200, { id: earlier.id });
    const message: FakeMessage = { id: crypto.randomUUID(), ...checked.mail, idempotencyKey: key, createdAt: new Date().toISOString() };
    stored.push(message);
    if (key) byKey.set(key, message);
    if (file) fs.appendFileSync(file, `${JSON.stringify(message)}\n`);
    answer(res, 200, { id: message.id });
  };

  const server = http.createServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://127.0.0.1");
    const route = `${req.method} ${url.pathname.replace(/\/+$/, "")}`;
    const handled = (async () => {
      if (route === "POST /emails") return send(req, res);
      if (route === "GET /emails") return answer(res, 200, { object: "list", has_more: false, data: [...stored].reverse() });
      const one = /^GET \/emails\/([^/]+)$/.exec(route);
      if (one) {
        const found = stored.find((m) => m.id === one[1]);
        return found ? answer(res, 200, { object: "email", ...found }) : problem(res, 404, "not_found", "Email not found.");
      }
      if (route === "POST /_fake/fail") {
        const body = JSON.parse((await readBody(req)) || "{}") as { count?: unknown };
        const count = Number(body.count ?? 1);
        if (!Number.isInteger(count) || count < 0) return problem(res, 422, "validation_error", "count must be a whole number.");
        failures = count;
        return answer(res, 200, { failNext: failures });
      }
      problem(res, 404, "not_found", "The local fake provider has no such route.");
    })();
    handled.catch(() => {
      if (!res.headersSent) problem(res, 400, "invalid_request", "The request could not be read.");
      else res.end();
    });
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  const address = server.address();
  const actualPort = typeof address === "object" && address ? address.port : port;

  return {
    url: `http://127.0.0.1:${actualPort}`,
    port: actualPort,
    messages: () => [...stored],
    failNext(count) {
      failures = count;
    },
    requests: () => received,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
