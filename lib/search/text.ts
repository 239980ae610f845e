import Fuse from "fuse.js";

export type SearchableDye = {
  id: string;
  code: string;
  name: string;
  synonyms: string[];
  casNumber: string | null;
  dyeClass: string;
  notes: string;
};

/**
 * Typo-tolerant text search over dyes (fuse.js). Exact code or CAS matches come first; the fuzzy
 * threshold 0.35 lets "merocyanin" or "Tidewatr" through without matching everything.
 */
export function searchDyesByText<T extends SearchableDye>(all: readonly T[], query: string, limit = 50): T[] {
  const q = query.trim();
  if (!q) return all.slice(0, limit);
  // CAS numbers match with or without their dashes (e.g. 10081-39-7 or 10081397).
  const digits = q.replace(/[\s-]/g, "");
  const casOf = (d: T) => (d.casNumber ?? "").replace(/-/g, "");
  const exact = all.filter((d) => d.code.toLowerCase() === q.toLowerCase() || d.casNumber === q || (/^\d{5,10}$/.test(digits) && casOf(d) === digits));
  const fuse = fuseFor(all);
  const fuzzy = fuse.search(q, { limit }).map((r) => r.item);
  const seen = new Set<string>();
  return [...exact, ...fuzzy].filter((d) => (seen.has(d.id) ? false : (seen.add(d.id), true))).slice(0, limit);
}

/** fuse.js indexes per list: a caller that passes the same (unchanged) array again reuses the index. */
const fuseCache = new WeakMap<readonly SearchableDye[], unknown>();

function fuseFor<T extends SearchableDye>(all: readonly T[]): Fuse<T> {
  const hit = fuseCache.get(all) as Fuse<T> | undefined;
  if (hit) return hit;
  const fuse = new Fuse(all, {
    keys: [
      { name: "code", weight: 3 },
      { name: "name", weight: 3 },
      { name: "synonyms", weight: 2 },
      { name: "casNumber", weight: 2 },
      { name: "dyeClass", weight: 1.5 },
      { name: "notes", weight: 0.5 },
    ],
    threshold: 0.35,
    ignoreLocation: true,
    minMatchCharLength: 2,
  });
  fuseCache.set(all, fuse);
  return fuse;
}
