import type { KeyedConnection } from "@/db/queries/lis-connections";

export type { KeyedConnection };

export interface KeySource {
  /** Every connection, revoked ones included. */
  loadAll(): Promise<KeyedConnection[]>;
  findByHash(keySha256: string): Promise<KeyedConnection | null>;
}

export interface KeyStoreOptions {
  /** How long a hash that matched no connection is remembered as unknown. */
  unknownTtlMs?: number;
  /** At most this many unknown hashes are remembered (random keys must not grow memory). */
  maxUnknown?: number;
  now?: () => number;
}

/**
 * The LIS connections every instance holds in memory, by the SHA-256 of their key, so that a
 * request with a key costs no database round trip. Reloaded whole (the table is small) on a
 * `bellwether_lis_connections` notification and on every (re)connection of the listening
 * connection; reloads never overlap, and a change announced during one triggers another. A hash
 * that is not in the map is looked up once and then remembered as unknown for a few seconds.
 * Keys themselves never reach this store: only their hashes.
 */
export class LisKeyStore {
  private byHash = new Map<string, KeyedConnection>();
  private unknown = new Map<string, number>();
  private pendingLookups = new Map<string, Promise<KeyedConnection | null>>();
  private firstLoad: Promise<void> | null = null;
  private loaded = false;
  private reloading: Promise<void> | null = null;
  private reloadAgain = false;
  private readonly unknownTtlMs: number;
  private readonly maxUnknown: number;
  private readonly now: () => number;

  constructor(
    private readonly source: KeySource,
    options: KeyStoreOptions = {},
  ) {
    this.unknownTtlMs = options.unknownTtlMs ?? 5000;
    this.maxUnknown = options.maxUnknown ?? 10_000;
    this.now = options.now ?? Date.now;
  }

  /** The connection holding the key with this hash (revoked or not), or null when none does. */
  async lookup(keySha256: string): Promise<KeyedConnection | null> {
    if (!this.loaded) await this.ensureLoaded();
    const known = this.byHash.get(keySha256);
    if (known) return known;
    const until = this.unknown.get(keySha256);
    if (until !== undefined && until > this.now()) return null;
    let pending = this.pendingLookups.get(keySha256);
    if (!pending) {
      pending = this.lookupOnce(keySha256).finally(() => this.pendingLookups.delete(keySha256));
      this.pendingLookups.set(keySha256, pending);
    }
    return pending;
  }

  private async lookupOnce(keySha256: string): Promise<KeyedConnection | null> {
    const found = await this.source.findByHash(keySha256);
    if (found) {
      this.byHash.set(found.keySha256, found);
      this.unknown.delete(keySha256);
      return found;
    }
    if (this.unknown.size >= this.maxUnknown) this.unknown.clear();
    this.unknown.set(keySha256, this.now() + this.unknownTtlMs);
    return null;
  }

  /** Loads the connections unless that has been done; a failed first load is tried again next time. */
  ensureLoaded(): Promise<void> {
    if (this.loaded) return Promise.resolve();
    this.firstLoad ??= this.reload().catch((err: unknown) => {
      this.firstLoad = null;
      throw err;
    });
    return this.firstLoad;
  }

  /**
   * Reloads every connection. Called on a notification and on (re)connection; while a reload
   * runs, further calls are folded into one more reload after it, which reads what they announced.
   */
  reload(): Promise<void> {
    if (this.reloading) {
      this.reloadAgain = true;
      return this.reloading;
    }
    this.reloading = (async () => {
      try {
        do {
          this.reloadAgain = false;
          const rows = await this.source.loadAll();
          this.byHash = new Map(rows.map((r) => [r.keySha256, r]));
          this.unknown.clear();
          this.loaded = true;
        } while (this.reloadAgain);
      } finally {
        this.reloading = null;
      }
    })();
    return this.reloading;
  }

  /** How many connections are held (for tests and status). */
  get size(): number {
    return this.byHash.size;
  }
}
