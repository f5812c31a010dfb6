import type { SignatureMeaning, VersionState } from "@/db/schema";

/** A version's state in plain words (UX.md, "Numbers and words"). */
export const VERSION_STATE_WORDS: Record<VersionState, string> = {
  draft: "Draft",
  awaiting_signoff: "Awaiting sign-off",
  in_force: "In force",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

/** What a signature means, in the words shown wherever it is shown. */
export const SIGNATURE_MEANING_WORDS: Record<SignatureMeaning, string> = {
  approved_for_clinical_use: "Approved for clinical use",
  reviewed_still_valid: "Reviewed: still valid",
  withdrawn_from_use: "Withdrawn from use",
};
