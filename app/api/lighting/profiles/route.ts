import { db } from "@/db/client";
import { listProfiles } from "@/db/queries/lighting";
import { apiRoute } from "@/lib/auth/guard";
import { ANY_ROLE } from "@/lib/auth/roles";
import { methodsTried } from "@/lib/lighting/calibration";
import { profileStatus } from "@/lib/lighting/status";

/** The methods a profile's fit tried, with plain and hull leave-one-out ΔE00 and why one was kept. */
function fitComparison(p: Parameters<typeof methodsTried>[0]) {
  const { methods, hullPatches, selection, problem } = methodsTried(p);
  return {
    methods: methods.map((m) => ({
      method: m.method,
      trainingMean: m.meanDeltaE00,
      looMean: m.meanLooDeltaE00,
      looMax: m.maxLooDeltaE00,
      hullLooMean: m.meanHullLooDeltaE00 ?? null,
      refusal: m.refusal ?? null,
    })),
    hullPatches,
    selection,
    ...(problem ? { problem } : {}),
  };
}

/**
 * Every lighting profile with its state (draft | approved | retired), its status now (expired and
 * not-yet-valid are derived from the validity window), method, illuminant, residuals (training and
 * leave-one-out ΔE00 per patch; with the methods tried, their hull leave-one-out ΔE00 and why one was
 * kept) and validity window. Read by every role; writes go through the
 * admin-only actions of the Lighting page.
 */
export const GET = apiRoute({ access: ANY_ROLE }, async () => {
  const now = new Date();
  return {
    profiles: listProfiles(db()).map(({ profile: p, target }) => ({
      id: p.id,
      name: p.name,
      state: p.state,
      status: profileStatus(p, now),
      usableOnBench: profileStatus(p, now) === "approved",
      illuminant: p.illuminant,
      colourTemperatureK: p.colourTemperatureK,
      lightSource: p.lightSource,
      camera: p.camera,
      cameraSettings: p.cameraSettings,
      method: p.method,
      correctionKind: p.correctionKind,
      target: target ? { id: target.id, name: target.name, whitePoint: target.whitePoint } : null,
      residuals: {
        unit: "ΔE00 (CIEDE2000)",
        looMean: p.looMeanDeltaE00,
        looMax: p.looMaxDeltaE00,
        patches: p.residuals ?? [],
        // Every method the fit tried (empty for profiles fitted before the calibration engine, e.g. the demo's).
        ...fitComparison(p),
      },
      validFrom: p.validFrom.toISOString(),
      validUntil: p.validUntil?.toISOString() ?? null,
      approvedAt: p.approvedAt?.toISOString() ?? null,
      retiredAt: p.retiredAt?.toISOString() ?? null,
    })),
  };
});
