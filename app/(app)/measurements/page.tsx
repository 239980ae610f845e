import type { Metadata } from "next";
import { db } from "@/db/client";
import { listMeasurements, measurementFilterChoices } from "@/db/queries/measurements";
import { tableParams, toFilters } from "@/app/api/measurements/filters";
import { MeasurementsTable, type TableRow } from "@/components/measurements/measurements-table";
import { MeasurementFiltersForm } from "@/components/measurements/filters-form";
import { Notice, PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE } from "@/lib/auth/roles";
import { labD65InSrgbGamut, labD65ToHex } from "@/lib/color/display";

export const metadata: Metadata = { title: "Measurements" };

export default async function MeasurementsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { user } = await pageAccess(ANY_ROLE);
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  const parsed = tableParams.safeParse(raw);
  const params = parsed.success ? parsed.data : tableParams.parse({});
  const handle = db();
  const { rows, total } = listMeasurements(handle, {
    filters: toFilters(params, params.state, user.id),
    sort: params.sort,
    direction: params.dir,
    page: params.page,
    pageSize: params.pageSize,
  });
  const choices = measurementFilterChoices(handle);
  const tableRows: TableRow[] = rows.map((r) => ({
    id: r.m.id,
    dye: `${r.dye.code} · ${r.dye.name}`,
    solvent: r.solvent.name,
    medium: r.solvent.medium,
    acidBase: r.condition.acidBase,
    ph: r.condition.ph,
    concentration: r.condition.concentrationUmolL,
    l: r.m.l,
    a: r.m.a,
    b: r.m.b,
    c: r.chroma,
    h: r.hue,
    hex: labD65ToHex([r.m.l, r.m.a, r.m.b]),
    inGamut: labD65InSrgbGamut([r.m.l, r.m.a, r.m.b]),
    profile: r.profile?.name ?? (r.m.correctionKind === "white-scaling" ? "white card only" : null),
    uDeltaE00: r.m.uDeltaE00,
    flags: r.m.flags,
    state: r.m.reviewState,
    measuredAt: r.m.createdAt.toISOString(),
    author: r.author,
    photoId: r.m.photoId,
  }));
  const query = new URLSearchParams(Object.entries(raw).filter((e): e is [string, string] => typeof e[1] === "string" && e[1] !== ""));
  const exportQuery = new URLSearchParams(query);
  for (const k of ["sort", "dir", "page", "pageSize"]) exportQuery.delete(k);
  exportQuery.set("format", "csv");
  exportQuery.set("state", params.state ?? "any");
  return (
    <>
      <PageHeader
        title="Measurements"
        lead="Every colour measured on the bench, CIELAB relative to D65 (CIE 1931 2° observer). Filter, sort and export; only accepted measurements count in search and the solvent models. Screen swatches are approximations: decisions rest on the numbers."
      />
      {!parsed.success && (
        <div className="mb-4">
          <Notice tone="error" title="Some filters were not understood and were ignored">
            {parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join(" ")}
          </Notice>
        </div>
      )}
      <MeasurementFiltersForm choices={choices} values={params} />
      <MeasurementsTable
        rows={tableRows}
        total={total}
        page={params.page}
        pageSize={params.pageSize}
        sort={params.sort}
        dir={params.dir}
        query={query.toString()}
        exportHref={`/api/measurements?${exportQuery.toString()}`}
      />
    </>
  );
}
