import { AppError } from "./errors";

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

/** The body as JSON; 400 with a plain message when it is not UTF-8 text or not valid JSON. */
export function parseJsonBody(bytes: Uint8Array): unknown {
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new AppError("bad_request", "The request body is not valid UTF-8 text: send JSON encoded as UTF-8.");
  }
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}
