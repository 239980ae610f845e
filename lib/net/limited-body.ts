/**
 * Reads a request body while counting its bytes, and stops at the limit: a body sent in chunks
 * without Content-Length is refused as soon as it passes the limit, not after it has all arrived.
 */
import { AppError } from "../errors";

export function megabytes(bytes: number): string {
  return `${(bytes / 1048576).toFixed(bytes < 1048576 ? 2 : 1)} MB`;
}

export function tooLarge(limit: number, what = "The request"): AppError {
  return new AppError("too_large", `${what} is larger than ${megabytes(limit)}, the most this server accepts. Send less at once (fewer regions, a smaller photo).`);
}

/** Refuses early when Content-Length already says the body is too large. */
export function checkDeclaredLength(headers: Headers, limit: number, what?: string): void {
  const declared = Number(headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > limit) throw tooLarge(limit, what);
}

/** The whole body, at most `limit` bytes; past that the stream is cancelled and a 413 AppError thrown. */
export async function readLimited(body: ReadableStream<Uint8Array> | null, limit: number, what?: string): Promise<Uint8Array<ArrayBuffer>> {
  if (!body) return new Uint8Array(0);
  const reader = body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(limit, what);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}
