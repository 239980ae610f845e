"use client";

import { usePathname, useRouter } from "next/navigation";
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useMemo, useTransition } from "react";
import { FlagBadges } from "@/components/bench/flag-badges";
import { MEDIUM_LABELS, type MediumClass } from "@/lib/solvents/parameters";

export type TableRow = {
  id: string;
  dye: string;
  solvent: string;
  medium: string;
  acidBase: string;
  ph: number | null;
  concentration: number | null;
  l: number;
  a: number;
  b: number;
  c: number;
  h: number;
  hex: string;
  inGamut: boolean;
  profile: string | null;
  /** Combined standard uncertainty as ± ΔE00; null for rows made before it was stored. */
  uDeltaE00?: number | null;
  flags: string[];
  state: string;
  measuredAt: string;
  author: string;
  photoId: string | null;
};

const col = createColumnHelper<TableRow>();
const num = (v: number, d = 1) => v.toFixed(d);

/** Column id → the server's sort key (columns without one are not sortable). */
const SORT_KEYS: Record<string, string> = { swatch: "", dye: "dye", solvent: "solvent", medium: "medium", acidBase: "acidBase", ph: "ph", l: "l", c: "c", h: "h", state: "state", measuredAt: "measuredAt" };

const columns = [
  col.display({
    id: "swatch",
    header: "Colour",
    cell: ({ row }) => (
      <span
        role="img"
        aria-label={`L* ${num(row.original.l)}, a* ${num(row.original.a)}, b* ${num(row.original.b)}${row.original.inGamut ? "" : " (outside sRGB: approximate)"}`}
        className="relative inline-block h-8 w-8 rounded-md border border-black/10"
        style={{ backgroundColor: row.original.hex }}
      >
        {!row.original.inGamut && <span className="absolute right-0 top-0 h-0 w-0 border-l-[8px] border-t-[8px] border-l-transparent border-t-white/90" />}
      </span>
    ),
  }),
  col.accessor("dye", { header: "Dye" }),
  col.accessor("solvent", { header: "Solvent" }),
  col.accessor("medium", { header: "Medium", cell: (c) => MEDIUM_LABELS[c.getValue() as MediumClass] ?? c.getValue() }),
  col.accessor("acidBase", { header: "Condition" }),
  col.accessor("ph", { header: "pH", cell: (c) => (c.getValue() === null ? "—" : c.getValue()) }),
  col.accessor("l", { header: "L* (D65)", cell: (c) => num(c.getValue()) }),
  col.display({ id: "ab", header: "a*, b*", cell: ({ row }) => `${num(row.original.a)}, ${num(row.original.b)}` }),
  col.accessor("c", { header: "C*ab", cell: (c) => num(c.getValue()) }),
  col.accessor("h", { header: "hab (°)", cell: (c) => num(c.getValue(), 0) }),
  col.accessor("uDeltaE00", { header: "± ΔE00", cell: (c) => (c.getValue() === null || c.getValue() === undefined ? "not recorded" : `± ${num(c.getValue()!, 1)}`) }),
  col.accessor("profile", { header: "Profile", cell: (c) => c.getValue() ?? "none" }),
  col.accessor("flags", { header: "Flags", cell: (c) => (c.getValue().length ? <FlagBadges flags={c.getValue()} size="short" /> : "—") }),
  col.accessor("state", { header: "State" }),
  col.accessor("measuredAt", { header: "Measured (UTC)", cell: (c) => c.getValue().slice(0, 16).replace("T", " ") }),
  col.accessor("author", { header: "By" }),
];

export function MeasurementsTable(props: { rows: TableRow[]; total: number; page: number; pageSize: number; sort: string; dir: "asc" | "desc"; query: string; exportHref: string }) {
  const router = useRouter();
  const pathname = usePathname();
  const [pending, startTransition] = useTransition();
  const sorting: SortingState = useMemo(() => {
    const id = Object.entries(SORT_KEYS).find(([, key]) => key === props.sort)?.[0];
    return id ? [{ id, desc: props.dir === "desc" }] : [];
  }, [props.sort, props.dir]);
  const pageCount = Math.max(1, Math.ceil(props.total / props.pageSize));

  const go = (changes: Record<string, string>) => {
    const q = new URLSearchParams(props.query);
    for (const [k, v] of Object.entries(changes)) q.set(k, v);
    startTransition(() => router.push(`${pathname}?${q.toString()}`));
  };

  const table = useReactTable({
    data: props.rows,
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    pageCount,
    state: { sorting, pagination: { pageIndex: props.page - 1, pageSize: props.pageSize } },
    enableSortingRemoval: false,
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      const first = next[0];
      if (first && SORT_KEYS[first.id]) go({ sort: SORT_KEYS[first.id], dir: first.desc ? "desc" : "asc", page: "1" });
    },
    getRowId: (r) => r.id,
  });

  const from = props.total === 0 ? 0 : (props.page - 1) * props.pageSize + 1;
  const to = Math.min(props.total, props.page * props.pageSize);

  return (
    <section aria-label="Measurements" aria-busy={pending} className="rounded-xl border border-line bg-white">
      <div className="flex flex-wrap items-center justify-between gap-3 border-b border-line px-4 py-3 text-sm">
        <p data-testid="measurement-count">
          {from}–{to} of {props.total} measurements
        </p>
        <div className="flex items-center gap-2">
          <label htmlFor="page-size" className="text-ink-soft">
            Rows per page
          </label>
          <select id="page-size" value={props.pageSize} onChange={(e) => go({ pageSize: e.target.value, page: "1" })} className="min-h-11 rounded-lg border border-line px-2">
            {[25, 50, 100, 200].map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
          <a href={props.exportHref} className="inline-flex min-h-11 items-center rounded-lg border border-line px-4 font-semibold" download>
            Export CSV (all {props.total})
          </a>
        </div>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full text-left text-sm">
          <thead className="bg-paper-deep/50 text-xs text-ink-soft">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const sortable = !!SORT_KEYS[header.column.id];
                  const state = header.column.getIsSorted();
                  return (
                    <th key={header.id} scope="col" className="whitespace-nowrap px-3 py-2" aria-sort={state ? (state === "desc" ? "descending" : "ascending") : undefined}>
                      {sortable ? (
                        <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex min-h-11 items-center gap-1 font-semibold hover:text-ink">
                          {flexRender(header.column.columnDef.header, header.getContext())}
                          <span aria-hidden>{state === "asc" ? "▲" : state === "desc" ? "▼" : "↕"}</span>
                        </button>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-line">
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} data-testid="measurement-row" className="hover:bg-paper/60">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="whitespace-nowrap px-3 py-1.5 tabular-nums">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {props.rows.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="px-4 py-6 text-center text-ink-soft">
                  No measurement matches these filters.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="flex flex-wrap items-center justify-between gap-2 border-t border-line px-4 py-3 text-sm">
        <span>
          Page {props.page} of {pageCount}
        </span>
        <div className="flex gap-2">
          <button type="button" disabled={props.page <= 1} onClick={() => go({ page: "1" })} className="min-h-11 rounded-lg border border-line px-3 disabled:opacity-40">
            First
          </button>
          <button type="button" disabled={props.page <= 1} onClick={() => go({ page: String(props.page - 1) })} className="min-h-11 rounded-lg border border-line px-3 disabled:opacity-40">
            Previous
          </button>
          <button type="button" disabled={props.page >= pageCount} onClick={() => go({ page: String(props.page + 1) })} className="min-h-11 rounded-lg border border-line px-3 disabled:opacity-40">
            Next
          </button>
          <button type="button" disabled={props.page >= pageCount} onClick={() => go({ page: String(pageCount) })} className="min-h-11 rounded-lg border border-line px-3 disabled:opacity-40">
            Last
          </button>
        </div>
      </nav>
    </section>
  );
}
