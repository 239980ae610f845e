import { db } from "@/db/client";
import { checkHealth } from "@/db/queries/health";
import { apiRoute } from "@/lib/auth/guard";
import { env } from "@/lib/config/env";
import { objectStore } from "@/lib/storage";

export const dynamic = "force-dynamic";

/** GET /api/health: 200 {"status":"ok",...} when database, migrations and photo store work; 503 otherwise. No auth, no secrets. */
export const GET = apiRoute({ access: "public" }, async () => {
  const report = await checkHealth(db, objectStore, env().STORAGE_DRIVER);
  return Response.json(report, { status: report.status === "ok" ? 200 : 503, headers: { "cache-control": "no-store" } });
});
