import { db } from "@/db/client";
import { canonicalContentOfVersion } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/**
 * The version's canonical content (RFC 8785) and its SHA-256, recomputed now, to compare with a
 * signature's contentSha256. Directors and scientists (donors:read: an empirical model carries
 * the reference values; versions:sign is the directors', who hold donors:read too).
 */
export const GET = apiRoute({ permission: "donors:read", params: versionIdParams }, async ({ params: { id } }) =>
  canonicalContentOfVersion(db(), { id }),
);
