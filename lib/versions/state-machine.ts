/**
 * The life of an interval version (DESIGN.md, "Interval version states"): which moves exist,
 * from which state each may start and where it leads, and the words shown for states and for
 * the meanings of signatures. The database's triggers (drizzle/0009_version-immutability.sql)
 * hold the same table of moves, so a move the code forgot to refuse still fails in SQL.
 */
import type { SIGNATURE_MEANINGS, VERSION_STATES } from "@/db/schema";

export type VersionState = (typeof VERSION_STATES)[number];
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];

export type VersionMove = "submit" | "return" | "sign" | "review" | "withdraw" | "reinstate";

/** Each move: the state it starts from and the state it leaves the version in. */
export const VERSION_MOVES: Record<VersionMove, { from: VersionState; to: VersionState }> = {
  submit: { from: "draft", to: "awaiting_signoff" },
  return: { from: "awaiting_signoff", to: "draft" },
  sign: { from: "awaiting_signoff", to: "in_force" },
  review: { from: "in_force", to: "in_force" },
  withdraw: { from: "in_force", to: "withdrawn" },
  /** Part of a withdrawal: the most recent superseded version goes back in force, signed again. */
  reinstate: { from: "superseded", to: "in_force" },
};

/** What a move means when it leaves a signature behind. */
export const SIGNATURE_MEANING_OF: Partial<Record<VersionMove, SignatureMeaning>> = {
  sign: "approved_for_clinical_use",
  review: "reviewed_still_valid",
  withdraw: "withdrawn_from_use",
  reinstate: "approved_for_clinical_use",
};

export const VERSION_STATE_LABELS: Record<VersionState, string> = {
  draft: "Draft",
  awaiting_signoff: "Awaiting sign-off",
  in_force: "In force",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

export const SIGNATURE_MEANING_LABELS: Record<SignatureMeaning, string> = {
  approved_for_clinical_use: "Approved for clinical use",
  reviewed_still_valid: "Reviewed: still valid",
  withdrawn_from_use: "Withdrawn from use",
};

/** The moves a director makes: never on a version they drafted, last revised or submitted. */
export const DIRECTOR_MOVES: readonly VersionMove[] = ["return", "sign", "review", "withdraw", "reinstate"];

/** Whether the move may start from the state. */
export function canMove(move: VersionMove, state: VersionState): boolean {
  return VERSION_MOVES[move].from === state;
}

const MOVE_WORDS: Record<VersionMove, string> = {
  submit: "submitted for sign-off",
  return: "returned to draft",
  sign: "signed off",
  review: "reviewed",
  withdraw: "withdrawn",
  reinstate: "reinstated",
};

const FROM_WORDS: Record<VersionState, string> = {
  draft: "a draft",
  awaiting_signoff: "a version awaiting sign-off",
  in_force: "a version in force",
  superseded: "a superseded version",
  withdrawn: "a withdrawn version",
};

/**
 * The reason a move is refused in the version's state (409), or null when it is allowed:
 * "Version 2 of GLU is in force: only a version awaiting sign-off can be signed off."
 */
export function refusalOfMove(move: VersionMove, { state, number, analyte }: { state: VersionState; number: number; analyte: string }): string | null {
  if (canMove(move, state)) return null;
  return `Version ${number} of ${analyte} is ${VERSION_STATE_LABELS[state].toLowerCase()}: only ${FROM_WORDS[VERSION_MOVES[move].from]} can be ${MOVE_WORDS[move]}.`;
}
