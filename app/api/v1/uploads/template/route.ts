import { db } from "@/db/client";
import { findAnalyteByCode } from "@/db/queries/analytes";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { templateQuery } from "@/lib/studies/upload-form";
import { templateCsv, templateXlsx } from "@/lib/uploads";

export const dynamic = "force-dynamic";

const XLSX_TYPE = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

/**
 * The blank template for healthy-donor uploads, or with `kind=routine` for an indirect study's
 * routine results, as CSV or XLSX. With `analyte` (a code), its example row is in that analyte's
 * unit; without, the example's unit is left empty (the study's analyte's unit).
 */
export const GET = apiRoute({ permission: "studies:write", query: templateQuery }, async ({ query }) => {
  let unit = "";
  if (query.analyte) {
    const analyte = await findAnalyteByCode(db(), { code: query.analyte });
    if (!analyte) throw new AppError("invalid", `There is no analyte with the code ${query.analyte}.`);
    unit = analyte.unit;
  }
  const routine = query.kind === "routine";
  const name = `bellwether-${routine ? "routine" : "donor"}-results${query.analyte ? `-${query.analyte}` : ""}.${query.format}`;
  const headers = { "content-disposition": `attachment; filename="${name}"`, "cache-control": "no-store" };
  if (query.format === "csv") return new Response(templateCsv({ unit, routine }), { headers: { ...headers, "content-type": "text/csv; charset=utf-8" } });
  const body = await templateXlsx({ unit, routine });
  return new Response(new Uint8Array(body), { headers: { ...headers, "content-type": XLSX_TYPE } });
});
