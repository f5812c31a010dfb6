import "server-only";
import type { Observation } from "fhir/r4";
import { ERROR_STATUS, type ErrorCode } from "@/lib/api/errors";
import { fhirResponse } from "@/lib/api/fhir";
import type { Principal } from "@/lib/auth/principal";
import {
  batchResponseOf,
  operationOutcome,
  outcomeOfStatus,
  readScoreRequest,
  scoredObservation,
  scoreItemOfObservation,
  type EntryOutcome,
  type ObservationScoreItem,
  type OutcomeIssueInput,
} from "@/lib/scoring/fhir";
import { MAX_SCORE_ITEMS, type ScoreResponse } from "./schemas";
import { scoreItems } from "./score-items";

/** Room for 10,000 Observations with a contained Patient each (about 700 bytes), with margin. */
export const MAX_FHIR_BODY_BYTES = 16 * 1024 * 1024;

/** An item error's HTTP status, from its problem type (`urn:bellwether:problem:<code>`); 422 otherwise. */
function statusOfProblemType(type: string): number {
  const code = /:([a-z_]+)$/.exec(type)?.[1];
  return code !== undefined && code in ERROR_STATUS ? ERROR_STATUS[code as ErrorCode] : 422;
}

type ScoreAnswer = ScoreResponse["results"][number];

function entryOutcomeOf(resource: Observation, answer: ScoreAnswer, cautionTexts: Record<string, string>): EntryOutcome {
  if ("error" in answer) {
    const status = statusOfProblemType(answer.error.type);
    return { status, outcome: outcomeOfStatus(status, `${answer.error.title}: ${answer.error.detail}`) };
  }
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
