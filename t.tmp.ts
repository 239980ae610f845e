import { databaseFile, openDatabase } from "./db/connection";
import { ensureDyeModel } from "./db/queries/models";
import { dyes } from "./db/schema";
const db = openDatabase(databaseFile(process.env.DATA_DIR!));
for (const d of db.select().from(dyes).all()) {
  const t = performance.now();
  const m = ensureDyeModel(db, { dyeId: d.id });
  const f = (x: number | null | undefined) => x == null ? "—" : x.toFixed(2);
  console.log(d.code, (performance.now() - t).toFixed(0) + "ms", "n=" + m.points.length, "flag=" + m.points.filter(p => !p.used).length, m.chosen ? m.chosen.route + "/" + m.chosen.model : "none:" + m.reason, "KT", f(m.scales[0].looDeltaE00), "ET", f(m.scales[1].looDeltaE00), "fe", f(m.scales[2].looDeltaE00), "direct", f(m.direct.looDeltaE00), "R2", f(m.scales[0].fit?.r2), "pred", m.predictions.length, "u", f(m.predictions[0]?.uncertaintyDeltaE00));
}
