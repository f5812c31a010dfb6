import { db } from "@/db/client";
import { lisUsage } from "@/db/queries/lis-connections";
import { apiRoute } from "@/lib/api/handler";

export const dynamic = "force-dynamic";

/** Scores logged per LIS connection and analyte over the last 24 hours and 7 days, by flag. */
export const GET = apiRoute({ permission: "users:manage" }, async () => lisUsage(db(), { now: new Date() }));
