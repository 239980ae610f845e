import { db } from "@/db/client";
import { earlierReplicates } from "@/db/queries/bench";
import { apiRoute } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { checkReplicate, replicateFlags } from "@/lib/bench/replicates";
import { replicateCheckSchema } from "@/lib/bench/schemas";
import { labToHex } from "@/lib/color/convert";

/**
 * Live replicate check while marking: for each vial, the earlier accepted colours of its dye in its
 * exact condition and whether the new colour disagrees with them (rule in lib/bench/replicates.ts).
 * Stores nothing; saving runs the same check on the colour measured again on the server.
 */
export const POST = apiRoute({ access: BENCH_ROLES, body: replicateCheckSchema }, async ({ body }) => {
  const handle = db();
  return {
    vials: body.vials.map((v) => {
      const earlier = earlierReplicates(handle, { dyeId: v.dyeId, condition: v });
      const verdict = checkReplicate(v.lab, earlier.map((e) => [e.l, e.a, e.b]), v.uncertaintyDeltaE00 ?? null);
      return {
        key: v.key,
        flags: replicateFlags(v.lab, verdict),
        earlier: earlier.map((e) => ({ id: e.id, lab: [e.l, e.a, e.b], hex: labToHex([e.l, e.a, e.b], "D65") })),
        verdict: verdict && { deltaE00: verdict.deltaE00, limitDeltaE00: verdict.limitDeltaE00, disagrees: verdict.disagrees, spreadDeltaE00: verdict.earlier.spreadDeltaE00, n: verdict.earlier.n },
      };
    }),
  };
});
