/**
 * Row checks of an instrument-colour CSV that need the catalogue and the solvent table: each row
 * parsed (lib/import/csv.ts), matched and brought to D65 (prepareInstrumentMeasurements), and a
 * flagged colour without a flag_reason refused. Shared by the measurement and the pH-series imports.
 */
import { checkMeasurementRows, measurementColumn, type RowProblem } from "../../lib/import/csv";
import type { Db } from "../connection";
import { prepareInstrumentMeasurements, type InstrumentColourToSave } from "./bench";

export function checkInstrumentRows(db: Db, rows: { line: number; cells: Record<string, string> }[]): { items: { line: number; item: InstrumentColourToSave }[]; problems: RowProblem[] } {
  const checked = checkMeasurementRows(rows);
  const valid = checked.filter((r) => r.value);
  const prepared = prepareInstrumentMeasurements(db, valid.map((r) => r.value!));
  const items: { line: number; item: InstrumentColourToSave }[] = [];
  valid.forEach((r, i) => {
    const p = prepared[i];
    if (!p.ok) r.problems.push(...p.errors.map((e) => ({ line: r.line, column: measurementColumn(e.field === "dye" ? ["dye"] : ["condition", e.field]), message: e.message })));
    else if (p.item.flags.length && !p.item.flagReason) {
      r.problems.push({ line: r.line, column: "flag_reason", message: `This colour is flagged (${p.item.flags.join(", ")}); say in flag_reason why it should be kept.` });
    } else items.push({ line: r.line, item: p.item });
  });
  return { items, problems: checked.flatMap((r) => r.problems) };
}
