import { sql } from "drizzle-orm";
import { db } from "@/db/client";
import { problemResponse, toProblem } from "@/lib/api/problem";

export const dynamic = "force-dynamic";

/** Liveness for the start script and monitoring: answers 200 when the database answers. */
export async function GET(request: Request) {
  try {
    await db().execute(sql`select 1`);
    return Response.json({ status: "ok", database: "ok" }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    console.error("Health check failed", err);
    return problemResponse({
      ...toProblem(new Error("database unavailable"), new URL(request.url).pathname),
      status: 503,
      title: "Unavailable",
      detail: "The database does not answer.",
    });
  }
}
