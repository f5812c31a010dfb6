import { describe, expect, it } from "vitest";
import { noIntervalReason } from "@/lib/versions/availability";

// DESIGN.md's version states: only a version in force is scored; the words are the page's own.
describe("why an analyte cannot be scored", () => {
  it("says nothing when a version is in force, whatever else there is", () => {
    expect(noIntervalReason(["draft", "in_force", "superseded"], null)).toBeNull();
  });
  it("names the reason: none yet, awaiting sign-off, in draft, withdrawn with its date", () => {
    expect(noIntervalReason([], null)).toBe("No interval yet: the laboratory has not established or adopted one for this analyte.");
    expect(noIntervalReason(["awaiting_signoff"], null)).toBe("No interval in force yet: a version is awaiting the director's sign-off.");
    expect(noIntervalReason(["draft"], null)).toBe("No interval in force yet: a version is in draft at the laboratory.");
    expect(noIntervalReason(["withdrawn", "superseded"], "2026-03-02")).toBe("No interval in force: the last one was withdrawn on 2026-03-02.");
  });
});
