/**
 * Structured JSON logs (pino), one line per event, for the server process (scripts/start.ts).
 * Secrets never reach a log line: request headers are not logged at all, URLs lose the secret part of
 * invitation and reset links and of secret-looking query parameters, and, as a second guard, pino's
 * redaction blanks passwords, tokens, cookies and Authorization headers wherever an object carries them.
 */
import pino, { type DestinationStream, type Logger } from "pino";

const SECRET_KEYS = ["password", "newPassword", "currentPassword", "token", "apiToken", "secret", "cookie", "authorization", "set-cookie", "sessionId"];

/** pino redaction paths: the secret keys at the top level and up to three levels down, and in headers. */
export const REDACT_PATHS = [
  ...SECRET_KEYS.flatMap((k) => [`["${k}"]`, `*["${k}"]`, `*.*["${k}"]`, `*.*.*["${k}"]`]),
  'req.headers["authorization"]',
  'req.headers["cookie"]',
  'res.headers["set-cookie"]',
];

export const REDACTED = "[redacted]";

export function createLogger(destination?: DestinationStream, level = process.env.LOG_LEVEL ?? "info"): Logger {
  return pino(
    {
      level,
      base: { service: "solvatlas", pid: process.pid },
      timestamp: pino.stdTimeFunctions.isoTime,
      redact: { paths: REDACT_PATHS, censor: REDACTED },
      formatters: { level: (label) => ({ level: label }) },
    },
    destination,
  );
}

/** Path segments after these hold a one-time secret (invitation and reset links). */
const SECRET_SEGMENT_AFTER = new Set(["reset", "invite"]);
const SECRET_PARAM = /token|password|secret|code|key|session/i;

/** The request path and query with secrets replaced, safe for a log line. */
export function safeUrl(url: string): string {
  let parsed: URL;
  try {
    parsed = new URL(url, "http://log.invalid");
  } catch {
    return "[unparseable url]";
  }
  const segments = parsed.pathname.split("/");
  for (let i = 1; i < segments.length; i++) if (SECRET_SEGMENT_AFTER.has(segments[i - 1]) && segments[i]) segments[i] = REDACTED;
  const params = [...parsed.searchParams.entries()].map(([k, v]) => `${encodeURIComponent(k)}=${SECRET_PARAM.test(k) ? REDACTED : encodeURIComponent(v)}`);
  return segments.join("/") + (params.length ? `?${params.join("&")}` : "");
}

/** A caller-supplied request id is kept only if it is short and plain; otherwise a new one is made. */
export function requestIdFrom(header: string | string[] | undefined, make: () => string): string {
  const value = Array.isArray(header) ? header[0] : header;
  return value && /^[A-Za-z0-9._-]{1,64}$/.test(value) ? value : make();
}
