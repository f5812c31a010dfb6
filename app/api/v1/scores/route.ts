import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { MAX_SCORE_BODY_BYTES, MAX_SCORE_ITEMS, scoreEnvelopeSchema } from "@/lib/scores/schemas";
import { scoreResponseJson } from "@/lib/scores/render";
import { scoreItems } from "@/lib/scores/score-items";

export const dynamic = "force-dynamic";

/**
 * Scores up to MAX_SCORE_ITEMS values against the intervals in force, each item on its own: a bad
 * item gets an error in its place. One item more is refused whole (413), as is a larger body.
 * The score log records the channel: "app" for a signed-in person (the score page), "api" for
 * an LIS key.
 */
export const POST = apiRoute(
  { permission: "scores:create", lisKey: true, body: scoreEnvelopeSchema, maxBodyBytes: MAX_SCORE_BODY_BYTES },
  async ({ principal, body }) => {
    if (body.items.length > MAX_SCORE_ITEMS) {
      throw new AppError(
        "payload_too_large",
        `A request may carry at most ${MAX_SCORE_ITEMS} items; this one has ${body.items.length}. Send them in several requests.`,
      );
    }
    const answer = await scoreItems({ items: body.items, principal, channel: principal.kind === "user" ? "app" : "api" });
    return new Response(scoreResponseJson(answer), { headers: { "content-type": "application/json", "cache-control": "no-store" } });
  },
);
