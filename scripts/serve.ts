/**
 * Serves the built app on 127.0.0.1 (`npm run serve`; `npm start` and `npm test` start it through
 * serveApp in scripts/lib/app-stack.ts). This is Next's documented custom server, for one reason:
 * Next sets `X-Forwarded-For` only when the client did not send one, so behind it the app cannot
 * tell a forged header from a real one. Here every request's client address is resolved from the
 * socket (believing `X-Forwarded-For` only from BELLWETHER_TRUSTED_PROXIES) and handed to the app
 * in a header of its own, which replaces anything a client sent under that name.
 *
 *   tsx scripts/serve.ts [--port N]     (default: $PORT, else 3000)
 */
import http from "node:http";
import path from "node:path";
import { parseArgs } from "node:util";
import next from "next";
import { CLIENT_ADDRESS_HEADER, formatIp, resolveClientAddress } from "../lib/api/client-address";
import { parseEnv } from "../lib/env";
import { runProcessShutdown } from "../lib/process-shutdown";

const ROOT = path.resolve(__dirname, "..");

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { port: { type: "string" } } });
  const port = Number(values.port ?? process.env.PORT ?? 3000);
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new Error(`"${values.port ?? process.env.PORT}" is not a port number`);
  // As `next start` does: the built app is served in production mode unless told otherwise.
  (process.env as Record<string, string | undefined>).NODE_ENV ??= "production";
  const { BELLWETHER_TRUSTED_PROXIES: trustedProxies } = parseEnv(process.env);

  const app = next({ dev: false, dir: ROOT, hostname: "127.0.0.1", port });
  const handle = app.getRequestHandler();
  await app.prepare();

  const server = http.createServer((req, res) => {
    delete req.headers[CLIENT_ADDRESS_HEADER];
    req.headers[CLIENT_ADDRESS_HEADER] = resolveClientAddress({
      socketAddress: req.socket.remoteAddress,
      forwardedFor: req.headers["x-forwarded-for"],
      trustedProxies,
    });
    handle(req, res).catch((err: unknown) => {
      console.error("Request failed", err);
      if (!res.headersSent) res.writeHead(500, { "content-type": "text/plain" });
      res.end("Internal error");
    });
  });

  // What the app registered for shutdown (the score log's last entries) runs before the exit.
  const stop = () => {
    server.close();
    runProcessShutdown(10_000)
      .then(() => app.close())
      .finally(() => process.exit(0));
  };
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", resolve);
  });
  const proxies = trustedProxies.length
    ? `, believing X-Forwarded-For from ${trustedProxies.map((r) => `${formatIp(r.bytes)}/${r.prefix}`).join(", ")}`
    : "";
  console.log(`bellwether: app listening on http://127.0.0.1:${port}${proxies}`);
}

main().catch((err: unknown) => {
  console.error(`bellwether: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
