import { db } from "@/db/client";
import { versionComparison } from "@/db/queries/version-comparison";
import { apiRoute } from "@/lib/api/handler";
import { versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** The version beside the one in force: limits per partition and donor flag changes (directors and scientists). */
export const GET = apiRoute({ permission: "donors:read", params: versionIdParams }, async ({ params: { id } }) => versionComparison(db(), { id }));
