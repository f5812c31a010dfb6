import "server-only";
import type { DossierData } from "@/lib/versions/dossier-workbook";
import { sealAuditChain } from "../audit-chain";
import type { Database } from "../client";
import { readAuditChainHead, recordAuditEvent, type Actor } from "./audit";
import { listExclusions } from "./exclusions";
import { findIntervalVersion } from "./interval-versions";
import { readStudyExport } from "./study-export";
import { versionAuditEvents } from "./version-record";

/**
 * Everything a version's dossier holds, in one snapshot (repeatable read), audited as
 * `interval_version.dossier_exported`. Donor results and exclusions only when `donorLevel`. The
 * audit events committed so far are sealed into the hash chain first, and the chain's head in the
 * snapshot goes into the dossier.
 */
export async function versionDossierData(
  database: Database,
  { id, actor, donorLevel }: { id: string; actor: Actor; donorLevel: boolean },
): Promise<DossierData> {
  await sealAuditChain(database.$client);
  return database.transaction(
    async (tx) => {
      const auditChainHead = await readAuditChainHead(tx);
      const version = await findIntervalVersion(tx, { id });
      const { signatures } = version;
      const study = version.studyId ? await readStudyExport(tx, { studyId: version.studyId, donors: donorLevel }) : null;
      const exclusions = donorLevel && version.studyId ? await listExclusions(tx, { studyId: version.studyId }) : [];
      const auditEvents = await versionAuditEvents(tx, { versionId: id, studyId: version.studyId });
      await recordAuditEvent(tx, {
        actor,
        action: "interval_version.dossier_exported",
        entityType: "interval_version",
        entityId: id,
        summary: `Exported the dossier of version ${version.number} of ${version.analyte.code}${donorLevel ? " with donor-level data" : " without donor-level data"}`,
        // The head handed out with the dossier, so the trail itself says which head each copy carries.
        details: { donorLevel, donorResults: study?.donorResults.length ?? 0, signatures: signatures.length, auditChainHead },
      });
      return {
        version: {
          ...version,
          createdBy: version.createdBy?.name ?? null,
          submittedBy: version.submittedBy?.name ?? null,
        },
        signatures: signatures.map((s) => ({ signer: s.signer.name, at: s.at, meaning: s.meaningLabel, contentSha256: s.contentSha256, comment: s.comment })),
        study,
        donorLevel,
        exclusions: exclusions
          .slice()
          .reverse()
          .map((x) => ({ ...x, createdBy: x.createdBy?.name ?? null })),
        auditEvents,
        auditChainHead,
        exportedAt: new Date(),
        exportedBy: actor.label,
      };
    },
    { isolationLevel: "repeatable read" },
  );
}
