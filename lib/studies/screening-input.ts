import { z } from "zod";
import { booleanText } from "./donor-results-query";
import { studyIdParams } from "./input";
import { partitionSchema } from "./partitions";

/** The outlier screens a scientist may run (lib/stats: outliers-horn, outliers-dixon, outliers-tukey). */
export const SCREEN_RULES = ["horn", "dixon", "tukey"] as const;
export type ScreenRule = (typeof SCREEN_RULES)[number];

const screenRule = z.enum(SCREEN_RULES, 'rule is "horn", "dixon" or "tukey".');

const reason = z
  .string("Give a reason.")
  .trim()
  .min(1, "Give a reason: every decision and exclusion keeps one.")
  .max(2_000, "Keep the reason under 2,000 characters.");

const donorResultId = z
  .number("A donor result id is a whole number.")
  .int("A donor result id is a whole number.")
  .positive("A donor result id is a whole number from 1.")
  .max(Number.MAX_SAFE_INTEGER, "A donor result id is a whole number from 1.");

/** POST …/screen: the rule, and the partition to screen (everyone when left out). */
export const screenBody = z
  .object({
    rule: screenRule,
    partition: partitionSchema.optional(),
  })
  .strict();

export type ScreenInput = z.output<typeof screenBody>;

/**
 * POST …/outlier-decisions. `rule` and `partition` say which screen's proposal is answered
 * (default Horn over everyone); its evidence is computed again on the server and kept.
 */
export const outlierDecisionBody = z
  .object({
    donorResultId,
    decision: z.enum(["exclude", "keep"], 'decision is "exclude" or "keep".'),
    reason,
    rule: screenRule.default("horn"),
    partition: partitionSchema.optional(),
  })
  .strict();

export type OutlierDecisionInput = z.output<typeof outlierDecisionBody>;

/** POST …/exclusions: manual exclusions, all or nothing. */
export const exclusionsBody = z
  .object({
    donorResultIds: z
      .array(donorResultId, "donorResultIds is a list of donor result ids.")
      .min(1, "Give at least one donor result id.")
      .max(10_000, "Give at most 10,000 donor result ids at a time.")
      .superRefine((ids, ctx) => {
        const seen = new Set<number>();
        for (const id of ids) {
          if (seen.has(id)) {
            ctx.addIssue({ code: "custom", message: `Donor result ${id} is listed twice.` });
            return;
          }
          seen.add(id);
        }
      }),
    reason,
  })
  .strict();

export type ExclusionsInput = z.output<typeof exclusionsBody>;

/** GET …/exclusions and …/outlier-decisions: in effect only, or `all=true` with the undone ones. */
export const listAllQuery = z.object({ all: booleanText.default(false) }).strict();

export const exclusionIdParams = studyIdParams.extend({ exclusionId: z.uuid("The exclusion id must be a UUID.") });
export const decisionIdParams = studyIdParams.extend({ decisionId: z.uuid("The decision id must be a UUID.") });
