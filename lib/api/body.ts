import { AppError } from "./errors";

/** A `\u0000` or surrogate escape somewhere in JSON text: only then can a parsed string hold either. */
const SUSPECT_ESCAPE = /\\u(?:0000|[dD][89a-fA-F][0-9a-fA-F]{2})/;

/**
 * Reads a request body of at most `maxBytes`: a declared Content-Length beyond it is refused at
 * once, and an undeclared or understated body is read no further than the limit (413 either way),
 * so an oversized request never fills the server's memory.
 */
export async function readBoundedBody(request: Request, maxBytes: number): Promise<Buffer<ArrayBuffer>> {
  const tooLarge = () => new AppError("payload_too_large", `The request body is larger than ${maxBytes} bytes.`);
  const declared = Number(request.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge();
  const chunks: Uint8Array[] = [];
  let total = 0;
  if (request.body) {
    const reader = request.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      total += value.byteLength;
      if (total > maxBytes) {
        await reader.cancel();
        throw tooLarge();
      }
      chunks.push(value);
    }
  }
  return Buffer.concat(chunks, total);
}

/**
 * The body as JSON; 400 with a plain message when it is not UTF-8 text or not valid JSON, 422
 * when a string in it cannot be stored as text (see {@link unstorableText}).
 */
export function parseJsonBody(bytes: Uint8Array): unknown {
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new AppError("bad_request", "The request body is not valid UTF-8 text: send JSON encoded as UTF-8.");
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
  if (SUSPECT_ESCAPE.test(text)) assertStorableJson(value);
  return value;
}

/**
 * Why a string cannot be stored or read back as the same text, or null: PostgreSQL's text and
 * jsonb refuse U+0000, and an unpaired UTF-16 surrogate (a JSON escape such as "\ud800") would
 * be stored as U+FFFD, silently changed.
 */
export function unstorableText(text: string): string | null {
  if (text.includes("\u0000")) return "the text holds the character U+0000 (NUL), which cannot be stored; remove it.";
  if (!text.isWellFormed()) {
    const lone = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/.exec(text)!;
    const code = lone[0].charCodeAt(0).toString(16).toUpperCase();
    return `the text holds an unpaired UTF-16 surrogate (U+${code}), which is not a character; send valid Unicode text.`;
  }
  return null;
}

/** 422 naming the field, in the shape of a zod refusal (`path: message`, with `errors`). */
export function unstorableTextError(path: string, message: string): AppError {
  return new AppError("invalid", `${path}: ${message}`, { errors: [{ path, message }] });
}

/**
 * Refuses (422, naming the first field) a parsed JSON value holding a string or key that cannot be
 * stored as text. Walks without recursion, so a deeply nested body cannot exhaust the stack.
 */
export function assertStorableJson(value: unknown): void {
  const stack: [unknown, string][] = [[value, ""]];
  while (stack.length > 0) {
    const [v, path] = stack.pop()!;
    if (typeof v === "string") {
      const problem = unstorableText(v);
      if (problem) throw unstorableTextError(path || "(root)", problem);
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push([v[i], path ? `${path}.${i}` : String(i)]);
    } else if (v !== null && typeof v === "object") {
      const entries = Object.entries(v);
      for (let i = entries.length - 1; i >= 0; i--) {
        const [key, child] = entries[i];
        const at = path ? `${path}.${key}` : key;
        const problem = unstorableText(key);
        if (problem) throw unstorableTextError(at, `the field name: ${problem}`);
        stack.push([child, at]);
      }
    }
  }
}
