import { describe, expect, it } from "vitest";
import { canMove, refusalOfMove, SIGNATURE_MEANING_LABELS, VERSION_STATE_LABELS } from "@/lib/versions/state-machine";

// Expected: DESIGN.md, "Interval version states", written out; labels from the contracts.
const ALLOWED: [string, string][] = [
  ["submit", "draft"],
  ["return", "awaiting_signoff"],
  ["sign", "awaiting_signoff"],
  ["review", "in_force"],
  ["withdraw", "in_force"],
  ["reinstate", "superseded"],
];
const STATES = ["draft", "awaiting_signoff", "in_force", "superseded", "withdrawn"] as const;
const MOVES = ["submit", "return", "sign", "review", "withdraw", "reinstate"] as const;

describe("the version state machine", () => {
  it("allows each move from one state only", () => {
    for (const move of MOVES) {
      for (const state of STATES) {
        const allowed = ALLOWED.some(([m, s]) => m === move && s === state);
        expect(canMove(move, state), `${move} from ${state}`).toBe(allowed);
      }
    }
  });

  it("says why a move is refused", () => {
    expect(refusalOfMove("sign", { state: "in_force", number: 2, analyte: "GLU" })).toBe(
      "Version 2 of GLU is in force: only a version awaiting sign-off can be signed off.",
    );
    expect(refusalOfMove("submit", { state: "withdrawn", number: 1, analyte: "K" })).toBe(
      "Version 1 of K is withdrawn: only a draft can be submitted for sign-off.",
    );
    expect(refusalOfMove("submit", { state: "draft", number: 1, analyte: "K" })).toBeNull();
  });

  it("labels states and signature meanings", () => {
    expect(Object.values(VERSION_STATE_LABELS)).toEqual(["Draft", "Awaiting sign-off", "In force", "Superseded", "Withdrawn"]);
    expect(SIGNATURE_MEANING_LABELS.approved_for_clinical_use).toBe("Approved for clinical use");
  });
});
