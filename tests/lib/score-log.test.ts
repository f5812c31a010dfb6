import { afterAll, describe, expect, it, vi } from "vitest";

/**
 * The score log's buffer without a database: the COPY is replaced by a stand-in that either
 * refuses as an unreachable PostgreSQL does (ECONNREFUSED) or takes the lines, so that the
 * keep-while-away, the bound and the order of what is written can be checked exactly.
 */
const copy = vi.hoisted(() => ({ down: false, lines: [] as string[], gate: null as Promise<void> | null }));

vi.mock("@/db/client", () => ({ db: () => ({}) }));
vi.mock("@/db/queries/score-log", () => ({
  copyScoreLogLines: async (_db: unknown, { chunks }: { chunks: Iterable<string> }) => {
    if (copy.gate) await copy.gate;
    if (copy.down) throw Object.assign(new Error("connect ECONNREFUSED 127.0.0.1:5432"), { code: "ECONNREFUSED" });
    let n = 0;
    for (const chunk of chunks) {
      for (const line of chunk.split("\n")) {
        if (!line) continue;
        copy.lines.push(line);
        n++;
      }
    }
    return n;
  },
}));

const { flushScoreLog, scoreLogStatus, scoreLogWriter, stopScoreLog, SCORE_LOG_MAX_BUFFERED } = await import("@/lib/scores/score-log");

const principal = { kind: "lis" as const, id: "0b7f6a52-6d0e-4a43-9d55-0c1f3b1f8a10", name: "Test LIS" };
const KEY = "11111111-1111-4111-8111-111111111111\t22222222-2222-4222-8222-222222222222\t33333333-3333-4333-8333-333333333333";

afterAll(async () => {
  copy.down = false;
  await stopScoreLog();
});

describe("the score log buffer", () => {
  it("writes one COPY line per score in PostgreSQL's text format, \\N for what is absent", async () => {
    const log = scoreLogWriter({ principal, channel: "api", scoredAt: new Date("2026-03-02T08:15:00Z") });
    log(KEY, 4.2, null, "N", 0.25, 59.87);
    log(KEY, 0.5, "<", "L", null, null);
    await flushScoreLog({ all: true });
    expect(copy.lines).toEqual([
      `2026-03-02T08:15:00.000Z\t${KEY}\t4.2\t\\N\tN\t0.25\t59.87\tlis\t${principal.id}\tapi`,
      `2026-03-02T08:15:00.000Z\t${KEY}\t0.5\t<\tL\t\\N\t\\N\tlis\t${principal.id}\tapi`,
    ]);
    expect(scoreLogStatus().buffered).toBe(0);
  });

  it("keeps entries while the database is away, writes them in order when it returns, and drops beyond the bound with a warning", async () => {
    copy.lines = [];
    copy.down = true;
    const warn = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const log = scoreLogWriter({ principal, channel: "api", scoredAt: new Date("2026-03-02T08:15:00Z") });
    for (let i = 0; i < 3; i++) log(KEY, i, null, "N", 0, 50);
    await flushScoreLog({ all: true });
    expect(scoreLogStatus().buffered).toBe(3);
    for (let i = 3; i < SCORE_LOG_MAX_BUFFERED + 10; i++) log(KEY, i, null, "N", 0, 50);
    expect(scoreLogStatus().buffered).toBe(SCORE_LOG_MAX_BUFFERED);
    await flushScoreLog({ all: true });
    expect(warn.mock.calls.map((c) => String(c[0]))).toContain(
      `bellwether: the score log buffer is full (${SCORE_LOG_MAX_BUFFERED} entries); 10 entries were not kept`,
    );
    copy.down = false;
    await flushScoreLog({ all: true });
    warn.mockRestore();
    expect(scoreLogStatus().buffered).toBe(0);
    expect(copy.lines).toHaveLength(SCORE_LOG_MAX_BUFFERED);
    // The oldest first, and the newest that the bound turned away are the ones missing.
    expect(copy.lines[0].split("\t")[4]).toBe("0");
    expect(copy.lines[SCORE_LOG_MAX_BUFFERED - 1].split("\t")[4]).toBe(String(SCORE_LOG_MAX_BUFFERED - 1));
  });

  it("keeps every entry made while a write that fails is in flight, however many (no spread-argument overflow)", async () => {
    copy.lines = [];
    copy.down = true;
    const warn = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const log = scoreLogWriter({ principal, channel: "api", scoredAt: new Date("2026-03-02T08:15:00Z") });
    for (let i = 0; i < 1_000; i++) log(KEY, i, null, "N", 0, 50);
    let open!: () => void;
    copy.gate = new Promise((resolve) => (open = resolve));
    const flushing = flushScoreLog({ all: true });
    // 300,000 scores while the COPY waits on a database that then refuses: far more than a
    // function call's arguments may number, well within SCORE_LOG_MAX_BUFFERED.
    for (let i = 1_000; i < 301_000; i++) log(KEY, i, null, "N", 0, 50);
    open();
    copy.gate = null;
    await expect(flushing).resolves.toBeUndefined();
    expect(scoreLogStatus().buffered).toBe(301_000);
    copy.down = false;
    await flushScoreLog({ all: true });
    warn.mockRestore();
    expect(scoreLogStatus().buffered).toBe(0);
    expect(copy.lines).toHaveLength(301_000);
    expect(copy.lines[0].split("\t")[4]).toBe("0");
    expect(copy.lines[300_999].split("\t")[4]).toBe("300999");
  });
});
