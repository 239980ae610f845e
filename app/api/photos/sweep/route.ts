import { z } from "zod";
import { db } from "@/db/client";
import { sweepOrphanFiles } from "@/db/queries/photos";
import { recordAudit } from "@/db/queries/audit";
import { apiRoute } from "@/lib/auth/guard";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { objectStore } from "@/lib/storage";

/**
 * Finds files in the photo store that no photo record points to (left by an upload interrupted between
 * writing the file and its record) and removes those older than `graceMinutes`. `dryRun=true` only lists.
 */
export const POST = apiRoute(
  {
    access: ADMIN_ONLY,
    query: z.object({
      dryRun: z.enum(["true", "false"]).default("false"),
      graceMinutes: z.coerce.number().min(0).max(7 * 24 * 60).default(60),
    }),
  },
  async ({ query, user }) => {
    const handle = db();
    const report = await sweepOrphanFiles(handle, objectStore(), { dryRun: query.dryRun === "true", graceMs: query.graceMinutes * 60_000 });
    if (report.removed > 0) {
      recordAudit(handle, { actorId: user.id, action: "photo.sweep", entity: "photo", after: { removed: report.removed, keys: report.orphans.map((o) => o.key) } });
    }
    return { sweep: report };
  },
);
