/**
 * A first guess at the mapping for a file whose headers are not the template's: the headers
 * laboratory exports commonly use for each column, compared without case, spaces or signs
 * ("Date of birth", "DOB" and "date_of_birth" alike). The scientist confirms or corrects it;
 * nothing is read with a guessed mapping without being shown first.
 */
import { TEMPLATE_COLUMNS, type ColumnMapping, type ColumnSet, type UploadColumn } from "./columns";

/** Common practice in laboratory and spreadsheet exports, no source: the names we have met. */
const NAMES: Record<UploadColumn, readonly string[]> = {
  donor_code: ["donorcode", "donor", "donorid", "donorno", "code", "id", "sampleid", "sample", "specimenid", "subject", "subjectid", "participant", "participantid", "patientid", "pseudonym"],
  sex: ["sex", "gender", "sexfm"],
  age_years: ["ageyears", "age", "agey", "ageyrs", "ageinyears", "years"],
  birth_date: ["birthdate", "dateofbirth", "dob", "born", "birthday"],
  collected_on: ["collectedon", "collected", "collectiondate", "datecollected", "sampledate", "samplingdate", "drawn", "drawnon", "drawdate", "date"],
  value: ["value", "result", "resultvalue", "measurement", "measuredvalue", "concentration", "conc"],
  unit: ["unit", "units", "uom", "resultunit", "unitofmeasure"],
  patient_key: ["patientkey", "patient", "patientid", "pid", "pseudonym", "patientpseudonym", "subject", "subjectid", "mrn", "caseid"],
  collected_at: ["collectedat", "collectiontime", "collectiondatetime", "collected", "sampletime", "sampledatetime", "drawntime", "datetime", "timestamp", "collectiondate", "date"],
  setting: ["setting", "care", "caresetting", "ward", "location", "source", "patientclass", "encounter", "encountertype"],
  flags: ["flags", "flag", "comments", "interference", "indices", "serumindices", "remarks"],
};

const normalise = (header: string) => header.toLowerCase().replace(/[^a-z0-9]/g, "");

/** Template column → the file's header it most likely is; columns with no likely header are left out. */
export function suggestMapping(headers: readonly string[], columns: ColumnSet = TEMPLATE_COLUMNS): ColumnMapping {
  const keys = headers.map(normalise);
  const taken = new Set<number>();
  const suggestion: ColumnMapping = {};
  // Exact template names first, so that "value" is never taken by a looser name of another column.
  for (const column of columns) {
    const i = keys.indexOf(normalise(column));
    if (i !== -1 && !taken.has(i)) {
      suggestion[column] = headers[i];
      taken.add(i);
    }
  }
  for (const column of columns) {
    if (suggestion[column] !== undefined) continue;
    for (const name of NAMES[column]) {
      const i = keys.findIndex((key, k) => key === name && !taken.has(k));
      if (i !== -1) {
        suggestion[column] = headers[i];
        taken.add(i);
        break;
      }
    }
  }
  return suggestion;
}
