import { db } from "@/db/client";
import { cancelUpload } from "@/db/queries/uploads";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { uploadIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

/** Discards a pending upload's rows; the upload stays on record as cancelled. */
export const POST = apiRoute({ permission: "studies:write", params: uploadIdParams }, async ({ caller, params }) =>
  cancelUpload(db(), { studyId: params.id, uploadId: params.uploadId, actor: actorOf(caller) }),
);
