import { defineConfig } from "drizzle-kit";
import { parseMigrationUrl } from "./lib/env";

// drizzle-kit changes the schema, which only its owner may do: it connects as BELLWETHER_MIGRATION_URL.
// (`npm run db:generate` compares files only and needs no connection.)
const migrationUrl = parseMigrationUrl(process.env);

export default defineConfig({
  schema: "./db/schema.ts",
  out: "./drizzle",
  dialect: "postgresql",
  dbCredentials: { url: migrationUrl ?? "postgres://bellwether_owner@127.0.0.1:54329/bellwether" },
  strict: true,
});
