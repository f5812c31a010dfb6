import "server-only";
import { sealAuditChain } from "@/db/audit-chain";
import { db } from "@/db/client";
import { onProcessShutdown } from "@/lib/process-shutdown";

/** How often each instance links the committed audit events; sealers of several instances take turns. */
export const SEAL_INTERVAL_MS = 1000;

interface SealerState {
  timer: NodeJS.Timeout | null;
  running: Promise<void> | null;
  failing: boolean;
  unregister: (() => void) | null;
}

const KEY = Symbol.for("bellwether.auditSealer");

function state(): SealerState {
  const g = globalThis as unknown as Record<symbol, SealerState | undefined>;
  g[KEY] ??= { timer: null, running: null, failing: false, unregister: null };
  return g[KEY];
}

/**
 * One pass of the sealer (db/audit-chain.ts), never two at once in this process. A database that
 * is away is said once, not every second; the queue waits in the database meanwhile.
 */
export function sealNow(): Promise<void> {
  const s = state();
  s.running ??= sealAuditChain(db().$client)
    .then(() => {
      if (s.failing) console.error("bellwether: the audit chain is being sealed again");
      s.failing = false;
    })
    .catch((err: unknown) => {
      if (!s.failing) console.error(`bellwether: the audit chain could not be sealed now; it will be on a later pass (${err instanceof Error ? err.message : String(err)})`);
      s.failing = true;
    })
    .finally(() => {
      s.running = null;
    });
  return s.running;
}

export function startAuditSealer(): void {
  const s = state();
  if (!s.timer) {
    s.timer = setInterval(() => void sealNow(), SEAL_INTERVAL_MS);
    s.timer.unref();
  }
  s.unregister ??= onProcessShutdown(sealNow);
}
