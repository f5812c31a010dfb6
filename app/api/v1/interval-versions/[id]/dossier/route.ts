import { db } from "@/db/client";
import { versionDossierData } from "@/db/queries/version-dossier";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { can } from "@/lib/auth/roles";
import { dossierWorkbook } from "@/lib/versions/dossier-workbook";
import { versionIdParams } from "@/lib/versions/input";

export const dynamic = "force-dynamic";

const XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

/** The version's dossier as an XLSX workbook; donor rows and exclusions only for roles that may read donor data. */
export const GET = apiRoute({ permission: "dossiers:read", params: versionIdParams }, async ({ caller, params: { id } }) => {
  const data = await versionDossierData(db(), { id, actor: actorOf(caller), donorLevel: can(caller.role, "donors:read") });
  const bytes = await dossierWorkbook(data);
  const date = data.exportedAt.toISOString().slice(0, 10);
  return new Response(new Uint8Array(bytes), {
    status: 200,
    headers: {
      "content-type": XLSX,
      "content-disposition": `attachment; filename="bellwether-dossier-${data.version.analyte.code.toLowerCase()}-v${data.version.number}-${date}.xlsx"`,
      "content-length": String(bytes.byteLength),
      "cache-control": "no-store",
    },
  });
});
