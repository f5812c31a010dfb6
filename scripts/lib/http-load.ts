/**
 * A small closed-loop HTTP load generator for the benchmarks: `connections` workers per target,
 * each sending its next request as soon as the previous answer is read, over keep-alive sockets.
 * Unlike autocannon it keeps every answer's status, timing, Retry-After and (when asked) body, so
 * that a benchmark can say what each request got, not only how many there were.
 */
import http from "node:http";

export interface LoadTarget {
  /** e.g. http://127.0.0.1:3260 */
  baseUrl: string;
  /** Label for reports, e.g. "A". */
  label: string;
}

export interface Sample {
  target: string;
  /** performance.now() when the request was sent and when its answer had been read. */
  sentAt: number;
  doneAt: number;
  /** 0 when no HTTP answer came (refused, reset, timed out). */
  status: number;
  retryAfter: string | null;
  contentType: string | null;
  /** The answer's body: always for non-2xx, for 2xx only with `keep2xxBodies`. */
  body: string | null;
  /** The socket error's code, or "timeout". */
  error: string | null;
}

export interface LoadOptions {
  targets: LoadTarget[];
  /** Connections (workers) per target. */
  connections: number;
  method: "GET" | "POST";
  path: string;
  headers: Record<string, string>;
  /** The body of request number i (counted over all targets). */
  body?: (i: number) => string;
  /** Stop after this many requests in all (those in flight finish). */
  total?: number;
  /** Stop sending once this fires. */
  signal?: AbortSignal;
  /** A request without an answer after this long counts as hung (error "timeout"). */
  timeoutMs: number;
  keep2xxBodies?: boolean;
  /** Called with each sample as it completes (for probes that act on progress). */
  onSample?: (s: Sample, completed: number) => void;
}

export interface LoadRun {
  samples: Sample[];
  startedAt: number;
  endedAt: number;
}

function once(agent: http.Agent, target: LoadTarget, o: LoadOptions, body: string | undefined): Promise<Sample> {
  return new Promise((resolve) => {
    const sentAt = performance.now();
    const url = new URL(o.path, target.baseUrl);
    const headers: Record<string, string> = { ...o.headers };
    if (body !== undefined) headers["content-length"] = String(Buffer.byteLength(body));
    let settled = false;
    const finish = (s: Omit<Sample, "target" | "sentAt" | "doneAt">) => {
      if (settled) return;
      settled = true;
      resolve({ target: target.label, sentAt, doneAt: performance.now(), ...s });
    };
    const req = http.request(url, { method: o.method, agent, headers }, (res) => {
      const chunks: Buffer[] = [];
      const status = res.statusCode ?? 0;
      const keep = status < 200 || status >= 300 || o.keep2xxBodies === true;
      res.on("data", (d: Buffer) => {
        if (keep) chunks.push(d);
      });
      res.on("end", () =>
        finish({
          status,
          retryAfter: (res.headers["retry-after"] as string | undefined) ?? null,
          contentType: res.headers["content-type"] ?? null,
          body: keep ? Buffer.concat(chunks).toString("utf8") : null,
          error: null,
        }),
      );
      res.on("error", (err: NodeJS.ErrnoException) => finish({ status: 0, retryAfter: null, contentType: null, body: null, error: err.code ?? err.message }));
    });
    req.setTimeout(o.timeoutMs, () => {
      finish({ status: 0, retryAfter: null, contentType: null, body: null, error: "timeout" });
      req.destroy();
    });
    req.on("error", (err: NodeJS.ErrnoException) => finish({ status: 0, retryAfter: null, contentType: null, body: null, error: err.code ?? err.message }));
    req.end(body);
  });
}

/** Runs the load until `total` requests have been sent or `signal` fires; resolves with every sample. */
export async function runLoad(o: LoadOptions): Promise<LoadRun> {
  const samples: Sample[] = [];
  let next = 0;
  const startedAt = performance.now();
  const more = () => !o.signal?.aborted && (o.total === undefined || next < o.total);
  const workers: Promise<void>[] = [];
  const agents: http.Agent[] = [];
  for (const target of o.targets) {
    const agent = new http.Agent({ keepAlive: true, maxSockets: o.connections });
    agents.push(agent);
    for (let c = 0; c < o.connections; c++) {
      workers.push(
        (async () => {
          while (more()) {
            const i = next++;
            const sample = await once(agent, target, o, o.body?.(i));
            samples.push(sample);
            o.onSample?.(sample, samples.length);
            // A refused connection answers at once: do not spin on a dead server.
            if (sample.status === 0 && sample.error !== "timeout") await new Promise((r) => setTimeout(r, 50));
          }
        })(),
      );
    }
  }
  await Promise.all(workers);
  const endedAt = performance.now();
  for (const a of agents) a.destroy();
  return { samples, startedAt, endedAt };
}

/** The q-quantile (0..1) of a list of numbers, by the nearest rank. */
export function quantile(xs: readonly number[], q: number): number {
  if (xs.length === 0) return NaN;
  const sorted = [...xs].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(q * sorted.length) - 1))];
}

/** Counts of samples by status ("0:ECONNREFUSED" for answers that never came). */
export function statusCounts(samples: readonly Sample[]): Map<string, number> {
  const counts = new Map<string, number>();
  for (const s of samples) {
    const key = s.status === 0 ? `no answer (${s.error})` : String(s.status);
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  return counts;
}

export function formatCounts(counts: Map<string, number>): string {
  return [...counts.entries()]
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([k, v]) => `${k}: ${v.toLocaleString("en")}`)
    .join(", ");
}
