import { db } from "@/db/client";
import { findIntervalVersion, updateIntervalVersion } from "@/db/queries/interval-versions";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { updateVersionBody, versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** One interval version with its partitions (directors and scientists). */
export const GET = apiRoute({ permission: "studies:write", params: versionIdParams }, async ({ params: { id } }) =>
  findIntervalVersion(db(), { id }),
);

/** Revises a draft; 409 for a version in any other state. */
export const PATCH = apiRoute(
  { permission: "studies:write", params: versionIdParams, body: updateVersionBody },
  async ({ caller, params: { id }, body }) => updateIntervalVersion(db(), { id, changes: body, actor: actorOf(caller) }),
);
