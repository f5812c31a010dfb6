import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startFakeMailProvider, type FakeMailProvider } from "@/lib/mail/fake-server";
import { resendSender } from "@/lib/mail/sender";
import { retryDelayMs } from "@/lib/mail/delivery";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "bellwether-mail-"));
const file = path.join(dir, "mail", "messages.jsonl");
let fake: FakeMailProvider;
beforeAll(async () => {
  fake = await startFakeMailProvider({ file });
});
afterAll(async () => {
  await fake.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

const mail = (key: string) => ({
  from: "Bellwether <bellwether@lab.example>",
  to: ["director@lab.example", "second.director@lab.example"],
  subject: `Version submitted ${key}`,
  text: "Sodium version 2 awaits sign-off.",
  idempotencyKey: key,
});

describe("the local fake of the provider's API, through Resend's SDK", () => {
  it("accepts the SDK's send request, answers an id and keeps the message in memory and in its file", async () => {
    const sender = resendSender({ apiKey: "re_dummy", baseUrl: fake.url });
    const result = await sender.send(mail("a1"));
    expect(result).toEqual({ ok: true, providerId: expect.stringMatching(/^[0-9a-f-]{36}$/) });
    const [kept] = fake.messages().filter((m) => m.subject === "Version submitted a1");
    expect(kept).toMatchObject({
      from: "Bellwether <bellwether@lab.example>",
      to: ["director@lab.example", "second.director@lab.example"],
      text: "Sodium version 2 awaits sign-off.",
      idempotencyKey: "a1",
    });
    expect(result.ok && result.providerId).toBe(kept.id);
    const lines = fs.readFileSync(file, "utf8").trim().split("\n").map((l) => JSON.parse(l));
    expect(lines.at(-1)).toEqual(kept);
    const listed = await (await fetch(`${fake.url}/emails`)).json();
    expect(listed.data[0].id).toBe(kept.id);
  });

  it("answers a repeated Idempotency-Key with the first id and keeps one message", async () => {
    const sender = resendSender({ apiKey: "re_dummy", baseUrl: fake.url });
    const first = await sender.send(mail("same-key"));
    const second = await sender.send(mail("same-key"));
    expect(second).toEqual(first);
    expect(fake.messages().filter((m) => m.idempotencyKey === "same-key")).toHaveLength(1);
  });

  it("fails the next N requests when told to, with the provider's error shape, then accepts again", async () => {
    const sender = resendSender({ apiKey: "re_dummy", baseUrl: fake.url });
    fake.failNext(2);
    expect(await sender.send(mail("f1"))).toEqual({
      ok: false,
      error: "500 internal_server_error: The local fake provider was told to fail this request.",
    });
    expect((await sender.send(mail("f2"))).ok).toBe(false);
    expect((await sender.send(mail("f3"))).ok).toBe(true);
    expect(fake.messages().map((m) => m.idempotencyKey)).not.toContain("f1");
  });

  it("can be told to fail over HTTP, for a fake running in another process", async () => {
    const res = await fetch(`${fake.url}/_fake/fail`, { method: "POST", body: JSON.stringify({ count: 1 }) });
    expect(await res.json()).toEqual({ failNext: 1 });
    const sender = resendSender({ apiKey: "re_dummy", baseUrl: fake.url });
    expect((await sender.send(mail("h1"))).ok).toBe(false);
    expect((await sender.send(mail("h2"))).ok).toBe(true);
  });

  it("refuses a send without an API key and one without recipients, as the provider does", async () => {
    const noKey = await fetch(`${fake.url}/emails`, { method: "POST", body: JSON.stringify(mail("x")) });
    expect(noKey.status).toBe(401);
    expect(await noKey.json()).toEqual({ statusCode: 401, name: "missing_api_key", message: "Missing API key in the authorization header." });
    const noTo = await fetch(`${fake.url}/emails`, {
      method: "POST",
      headers: { authorization: "Bearer re_dummy", "content-type": "application/json" },
      body: JSON.stringify({ ...mail("y"), to: [] }),
    });
    expect(noTo.status).toBe(422);
    expect((await noTo.json()).message).toBe("The `to` field must be an address or a list of addresses.");
  });

  it("reports a provider that cannot be reached as a failed send, not a throw", async () => {
    const gone = await startFakeMailProvider();
    const url = gone.url;
    await gone.close();
    const result = await resendSender({ apiKey: "re_dummy", baseUrl: url }).send(mail("gone"));
    expect(result.ok).toBe(false);
  });

  it("keeps what an earlier run stored when started again on the same file", async () => {
    const again = await startFakeMailProvider({ file });
    try {
      expect(again.messages().map((m) => m.subject)).toContain("Version submitted a1");
    } finally {
      await again.close();
    }
  });
});

describe("retry back-off", () => {
  it("doubles from one minute and stops growing at six hours (common practice, no source)", () => {
    expect([1, 2, 3, 4, 5].map(retryDelayMs)).toEqual([60_000, 120_000, 240_000, 480_000, 960_000]);
    expect(retryDelayMs(9)).toBe(256 * 60_000);
    expect(retryDelayMs(10)).toBe(6 * 60 * 60_000);
    expect(retryDelayMs(30)).toBe(6 * 60 * 60_000);
  });
});
