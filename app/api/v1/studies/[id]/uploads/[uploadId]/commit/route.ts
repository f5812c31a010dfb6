import { db } from "@/db/client";
import { commitUpload } from "@/db/queries/uploads";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { uploadIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** Stores a pending upload's valid rows as donor results, all or none. */
export const POST = apiRoute({ permission: "studies:write", params: uploadIdParams }, async ({ caller, params }) =>
  commitUpload(db(), { studyId: params.id, uploadId: params.uploadId, actor: actorOf(caller) }),
);
