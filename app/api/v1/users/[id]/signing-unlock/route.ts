import { db } from "@/db/client";
import { unlockSigning } from "@/db/queries/version-moves";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { userIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

/** Lifts the signing lock that failed signatures put on an account (administrators). */
export const POST = apiRoute({ permission: "users:manage", params: userIdParams }, async ({ caller, params: { id } }) =>
  unlockSigning(db(), { userId: id, actor: actorOf(caller) }),
);
