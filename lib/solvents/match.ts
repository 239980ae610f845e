/** Finds a solvent by id, name or synonym, ignoring letter case and surrounding spaces. */
export function matchSolvent<S extends { id: string; name: string; synonyms: string[] }>(solvents: readonly S[], text: string): S | undefined {
  const q = text.trim().toLowerCase();
  if (!q) return undefined;
  return solvents.find((s) => s.id === text.trim() || s.name.toLowerCase() === q) ?? solvents.find((s) => s.synonyms.some((x) => x.toLowerCase() === q));
}
