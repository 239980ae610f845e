import { db } from "@/db/client";
import { findDyeById } from "@/db/queries/dyes";
import { ensureDyeModel, listPredictions } from "@/db/queries/models";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { AppError } from "@/lib/errors";
import { modelSummary } from "@/lib/models/summary";

/**
 * GET /api/dyes/{id}/model — the dye's solvent model: fits side by side (band route on ν̃ in cm⁻¹ and the
 * direct CIELAB baseline), the chosen route, and predicted colours (CIELAB D65) with ± ΔE00 in the table
 * solvents the dye was not measured in. `model` is null with a `reason` when nothing could be fitted.
 */
export const GET = apiRoute<never, never, { id: string }>({ access: ANY_ROLE }, async ({ params }) => {
  const handle = db();
  const dye = findDyeById(handle, { id: params.id });
  if (!dye) throw new AppError("not_found", "No dye has this id; look it up with GET /api/dyes?q=.");
  const model = ensureDyeModel(handle, { dyeId: dye.id });
  const predictions = listPredictions(handle, { dyeId: dye.id });
  return {
    dye: { id: dye.id, code: dye.code, name: dye.name, class: dye.dyeClass },
    model: model.chosen ? modelSummary(model) : null,
    ...(model.chosen ? {} : { reason: model.reason }),
    predictions: predictions.map((p) => ({
      solvent: { id: p.solventId, name: p.solvent },
      lab: p.lab,
      uncertaintyDeltaE00: p.uncertaintyDeltaE00,
      extrapolated: p.extrapolated,
      predicted: true,
      route: p.route,
      model: p.model,
    })),
  };
});
