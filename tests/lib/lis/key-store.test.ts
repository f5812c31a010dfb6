import { describe, expect, it } from "vitest";
import { LisKeyStore, type KeyedConnection, type KeySource } from "@/lib/lis/key-store";

const conn = (id: string, keySha256: string, revoked = false): KeyedConnection => ({ id, name: `LIS ${id}`, keySha256, ratePerMinute: 100, revoked });

/** A table in memory that counts how often it is read. */
function source(rows: KeyedConnection[]) {
  const calls = { loadAll: 0, findByHash: 0 };
  const s: KeySource & { rows: KeyedConnection[]; calls: typeof calls } = {
    rows,
    calls,
    async loadAll() {
      calls.loadAll++;
      return s.rows.map((r) => ({ ...r }));
    },
    async findByHash(hash) {
      calls.findByHash++;
      return s.rows.find((r) => r.keySha256 === hash) ?? null;
    },
  };
  return s;
}

describe("the LIS key store", () => {
  it("loads once, then answers known hashes from memory", async () => {
    const table = source([conn("a", "aa"), conn("b", "bb", true)]);
    const store = new LisKeyStore(table);
    expect(await store.lookup("aa")).toMatchObject({ id: "a", revoked: false });
    expect(await store.lookup("bb")).toMatchObject({ id: "b", revoked: true });
    for (let i = 0; i < 100; i++) await store.lookup("aa");
    expect(table.calls).toEqual({ loadAll: 1, findByHash: 0 });
  });

  it("looks an unknown hash up once, then remembers it as unknown until the time runs out", async () => {
    let now = 1_000_000;
    const table = source([]);
    const store = new LisKeyStore(table, { unknownTtlMs: 5000, now: () => now });
    const answers = await Promise.all(Array.from({ length: 20 }, () => store.lookup("zz")));
    expect(answers.every((a) => a === null)).toBe(true);
    for (let i = 0; i < 50; i++) expect(await store.lookup("zz")).toBeNull();
    expect(table.calls.findByHash).toBe(1);
    now += 5001;
    table.rows.push(conn("z", "zz"));
    expect(await store.lookup("zz")).toMatchObject({ id: "z" });
    expect(table.calls.findByHash).toBe(2);
  });

  it("sees a revocation after a reload, and a reload asked for during one runs again after it", async () => {
    const table = source([conn("a", "aa")]);
    const store = new LisKeyStore(table);
    await store.ensureLoaded();
    table.rows[0].revoked = true;
    const first = store.reload();
    const second = store.reload();
    await Promise.all([first, second]);
    expect(table.calls.loadAll).toBe(3);
    expect(await store.lookup("aa")).toMatchObject({ revoked: true });
  });

  it("tries the first load again when it failed", async () => {
    const table = source([conn("a", "aa")]);
    let fail = true;
    const flaky: KeySource = { loadAll: () => (fail ? Promise.reject(new Error("database away")) : table.loadAll()), findByHash: table.findByHash };
    const store = new LisKeyStore(flaky);
    await expect(store.lookup("aa")).rejects.toThrow("database away");
    fail = false;
    expect(await store.lookup("aa")).toMatchObject({ id: "a" });
  });
});
