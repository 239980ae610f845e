/** "1 dye", "2 dyes", "1 vial", "0 vials": a number with its noun in the right number (English). */
export function count(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString("en")} ${n === 1 ? one : many}`;
}
