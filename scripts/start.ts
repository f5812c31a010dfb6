/**
 * npm start (after scripts/ensure-system.sh): the private PostgreSQL (or DATABASE_URL),
 * migrations, the demo seed on an empty database, a build when sources changed, and the app on
 * http://127.0.0.1:PORT. Ctrl-C stops the app and the private cluster.
 */
import path from "node:path";
import type { ChildProcess } from "node:child_process";
import { stopServer } from "../db/local-server";
import { buildIfNeeded, ensureSecret, migrateAndSeed, prepareDatabase, ROOT, serveApp, stopApp, type DatabaseHandle } from "./lib/app-stack";

async function main() {
  const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_DATA_DIR ?? ".data");
  const port = Number(process.env.PORT ?? 3000);
  const pgPort = Number(process.env.BELLWETHER_PG_PORT ?? 54329);

  let database: DatabaseHandle | null = null;
  let app: ChildProcess | null = null;
  let stopping = false;
  const shutdown = async (code: number) => {
    if (stopping) return;
    stopping = true;
    await stopApp(app);
    if (database?.server) {
      stopServer(database.server);
      console.log("bellwether: stopped the private PostgreSQL");
    }
    process.exit(code);
  };
  process.on("SIGINT", () => void shutdown(0));
  process.on("SIGTERM", () => void shutdown(0));

  try {
    database = await prepareDatabase({ dataRoot, pgPort, database: "bellwether", external: process.env.DATABASE_URL });
    console.log(
      database.server
        ? `bellwether: private PostgreSQL on 127.0.0.1:${pgPort} (data in ${path.relative(ROOT, database.server.dataDir) || database.server.dataDir})`
        : "bellwether: using the database in DATABASE_URL",
    );
    const { seeded } = await migrateAndSeed(database.url);
    console.log(seeded ? "bellwether: seeded the demo laboratory" : "bellwether: database ready (existing data kept)");
    const secret = ensureSecret(dataRoot);
    buildIfNeeded();
    const url = `http://127.0.0.1:${port}`;
    app = await serveApp({
      port,
      env: {
        ...process.env,
        NODE_ENV: "production",
        DATABASE_URL: database.url,
        NEXTAUTH_SECRET: secret,
        NEXTAUTH_URL: process.env.NEXTAUTH_URL ?? url,
      },
    });
    console.log(`bellwether: serving on ${url} (Ctrl-C stops it)`);
    app.on("exit", (code) => void shutdown(code ?? 0));
  } catch (err) {
    console.error(`bellwether: ${err instanceof Error ? err.message : String(err)}`);
    await shutdown(1);
  }
}

void main();
