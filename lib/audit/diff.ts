/**
 * Before/after of an audit entry as a list of changed fields, for people to read. Pure: no database.
 */
export type FieldChange = { field: string; before: string; after: string };

// Bookkeeping that changes on every write and tells a reader nothing.
const NOISE = new Set(["updatedAt", "createdAt", "passwordHash", "hashedPassword", "tokenHash", "secret"]);
const HIDDEN = /password|hash|secret|token/i;

/** A value in words: empty for null, lists joined, numbers as stored (never rounded), dates as ISO. */
export function showValue(v: unknown): string {
  if (v === null || v === undefined || v === "") return "—";
  if (Array.isArray(v)) return v.length ? v.map(showValue).join(", ") : "—";
  if (typeof v === "object") return JSON.stringify(v);
  return String(v);
}

/** "casNumber" → "cas number", "ktPiStar" → "kt pi star": the stored name spaced for reading. */
export function fieldWords(key: string): string {
  return key.replace(/([a-z0-9])([A-Z])/g, "$1 $2").replace(/_/g, " ").toLowerCase();
}

/**
 * The fields whose value differs between before and after (both flat records as stored by recordAudit).
 * A creation (no before) lists every field of after; a deletion every field of before. Secrets are
 * named but never shown.
 */
export function auditDiff(before: unknown, after: unknown): FieldChange[] {
  const b = before && typeof before === "object" && !Array.isArray(before) ? (before as Record<string, unknown>) : {};
  const a = after && typeof after === "object" && !Array.isArray(after) ? (after as Record<string, unknown>) : {};
  if (!before && after !== null && after !== undefined && typeof after !== "object") return [{ field: "value", before: "—", after: showValue(after) }];
  const keys = [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => !NOISE.has(k));
  const out: FieldChange[] = [];
  for (const k of keys) {
    // Compared as shown: "" and null both read "—" and are no change to a reader.
    if (showValue(b[k]) === showValue(a[k])) continue;
    out.push(HIDDEN.test(k) ? { field: fieldWords(k), before: "(hidden)", after: "(changed)" } : { field: fieldWords(k), before: showValue(b[k]), after: showValue(a[k]) });
  }
  return out;
}
