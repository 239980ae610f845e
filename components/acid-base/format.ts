/** A pKa's standard error for display: two decimals, or "—" when the bootstrap could not give one. */
export function seText(se: number | null | undefined): string {
  return se === null || se === undefined || !Number.isFinite(se) ? "—" : se.toFixed(2);
}
