/** Fetches JSON from a Solvatlas route; an API error becomes an Error with the server's message. */
export async function fetchJson<T>(url: string, signal?: AbortSignal): Promise<T> {
  const res = await fetch(url, { signal, headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The server answered ${res.status}; try again.`);
  return body as T;
}

export type Condition = { solvent: string; medium: "protic" | "dipolar-aprotic" | "nonpolar"; acidBase: "acid" | "neutral" | "base"; pH: number | null };

export function describeCondition(c: Condition): string {
  const medium = { protic: "protic", "dipolar-aprotic": "dipolar aprotic", nonpolar: "non-polar" }[c.medium];
  return `${c.solvent} (${medium}), ${c.acidBase}${c.pH !== null ? `, pH ${c.pH}` : ""}`;
}
