import { db } from "@/db/client";
import { studyExportData } from "@/db/queries/study-export";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyWorkbook } from "@/lib/studies/export-workbook";
import { studyIdParams } from "@/lib/studies/input";

export const dynamic = "force-dynamic";

const XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

/** The study as an XLSX workbook: donor-level data, so directors and scientists only. */
export const GET = apiRoute({ permission: "donors:read", params: studyIdParams }, async ({ caller, params: { id } }) => {
  const data = await studyExportData(db(), { studyId: id, actor: actorOf(caller) });
  const bytes = await studyWorkbook(data);
  const slug = data.study.title.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "").slice(0, 60) || "study";
  const date = data.exportedAt.toISOString().slice(0, 10);
  return new Response(new Uint8Array(bytes), {
    status: 200,
    headers: {
      "content-type": XLSX,
      "content-disposition": `attachment; filename="bellwether-${data.analyte.code.toLowerCase()}-${slug}-${date}.xlsx"`,
      "content-length": String(bytes.byteLength),
      "cache-control": "no-store",
    },
  });
});
