import "server-only";
import type { Observation, OperationOutcome } from "fhir/r4";
import { ERROR_STATUS, type ErrorCode } from "@/lib/api/errors";
import { fhirResponse } from "@/lib/api/fhir";
import type { Principal } from "@/lib/auth/principal";
import {
  batchResponseOf,
  issueTypeOfStatus,
  operationOutcome,
  outcomeOfStatus,
  readScoreRequest,
  scoredObservation,
  scoreItemOfObservation,
  type EntryOutcome,
  type IssueType,
  type ObservationScoreItem,
  type OutcomeIssueInput,
} from "@/lib/scoring/fhir";
import { MAX_SCORE_ITEMS, type ScoreResponse } from "./schemas";
import { SCORE_ITEM_ERRORS, scoreItems } from "./score-items";

/** Room for 10,000 Observations with a contained Patient each (about 700 bytes), with margin. */
export const MAX_FHIR_BODY_BYTES = 16 * 1024 * 1024;

/** An item error's HTTP status, from its problem type (`urn:bellwether:problem:<code>`); 422 otherwise. */
function statusOfProblemType(type: string): number {
  const code = /:([a-z_]+)$/.exec(type)?.[1];
  return code !== undefined && code in ERROR_STATUS ? ERROR_STATUS[code as ErrorCode] : 422;
}

type ScoreAnswer = ScoreResponse["results"][number];

/** The score service's item errors in FHIR's terms: issue type, the element concerned, a hint. */
const ITEM_ERROR_ISSUES: Record<string, { code: IssueType; expression?: string; hint?: string }> = {
  [SCORE_ITEM_ERRORS.unknownAnalyte.type]: { code: "code-invalid", expression: "Observation.code" },
  [SCORE_ITEM_ERRORS.noInterval.type]: { code: "processing", expression: "Observation.code" },
  [SCORE_ITEM_ERRORS.noPartition.type]: {
    code: "processing",
    expression: "Observation.subject",
    hint: "In FHIR, sex and age come from the contained Patient that subject refers to (gender, birthDate) with the Observation's effectiveDateTime.",
  },
  [SCORE_ITEM_ERRORS.unit.type]: { code: "value", expression: "Observation.valueQuantity.code" },
};

function itemErrorOutcome(error: { type: string; title: string; detail: string }): { status: number; outcome: OperationOutcome } {
  const status = statusOfProblemType(error.type);
  const known = ITEM_ERROR_ISSUES[error.type];
  const diagnostics = `${error.title}: ${error.detail}${known?.hint ? ` ${known.hint}` : ""}`;
  return {
    status,
    outcome: operationOutcome([{ code: known?.code ?? issueTypeOfStatus(status), diagnostics, expression: known?.expression ? [known.expression] : undefined }]),
  };
}

function entryOutcomeOf(resource: Observation, answer: ScoreAnswer, cautionTexts: Record<string, string>): EntryOutcome {
  if ("error" in answer) return itemErrorOutcome(answer.error);
  return { status: 200, observation: scoredObservation(resource, answer, cautionTexts) };
}

/**
 * POST /api/v1/fhir/Observation/$score: reads an Observation or a Bundle of them, scores every
 * readable one in one call of the score service (channel "fhir", so the score log says so), and
 * answers the scored Observation (or its OperationOutcome with the item's status), or for a
 * Bundle a batch-response with each entry's status in order.
 */
export async function scoreFhirBody({ body, principal, now }: { body: unknown; principal: Principal; now?: Date }): Promise<Response> {
  const request = readScoreRequest(body);
  if ("error" in request) return fhirResponse(operationOutcome([request.error]), 422);
  const sent = request.kind === "observation" ? [{ resource: request.observation }] : request.entries;
  if (sent.length > MAX_SCORE_ITEMS) {
    return fhirResponse(
      outcomeOfStatus(413, `A Bundle may carry at most ${MAX_SCORE_ITEMS} Observations; this one has ${sent.length}. Send them in several requests.`),
      413,
    );
  }

  const readings = sent.map((s) => scoreItemOfObservation(s.resource));
  const items: ObservationScoreItem[] = [];
  for (const r of readings) if (r.ok) items.push(r.item);
  const scored = items.length > 0 ? await scoreItems({ items, principal, channel: "fhir", now }) : { results: [], cautionTexts: {} };

  let next = 0;
  const outcomes: EntryOutcome[] = readings.map((reading, i) => {
    const fullUrl = "fullUrl" in sent[i] ? (sent[i] as { fullUrl?: string }).fullUrl : undefined;
    const base = fullUrl !== undefined ? { fullUrl } : {};
    if (!reading.ok) return { ...base, status: 422, outcome: operationOutcome(reading.issues as OutcomeIssueInput[]) };
    return { ...base, ...entryOutcomeOf(sent[i].resource as Observation, scored.results[next++], scored.cautionTexts) };
  });

  if (request.kind === "observation") {
    const only = outcomes[0];
    return "observation" in only ? fhirResponse(only.observation) : fhirResponse(only.outcome, only.status);
  }
  return fhirResponse(batchResponseOf(outcomes, (now ?? new Date()).toISOString()));
}
