import type { Region } from "@/db/schema";

export type SavedRegion = { id: string; label: string; region: Region; state: "pending" | "accepted" | "rejected"; flagged: boolean };

const STROKE = { pending: "#5eead4", accepted: "#86efac", rejected: "#fca5a5" } as const;

/**
 * A read-only view of a photo with the regions saved from it, numbered as in the list beside it.
 * Dashed outlines are flagged; the outline colour follows the review state and the label says it too,
 * so colour is never the only cue.
 */
export function SavedMarking({ photo, regions }: { photo: { id: string; width: number; height: number; name: string }; regions: SavedRegion[] }) {
  const W = photo.width;
  const H = photo.height;
  const font = Math.max(12, W / 70);
  return (
    <figure className="space-y-1">
      <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full rounded-lg border border-line bg-[#1b1f27]" role="img" aria-label={`Photo ${photo.name} with ${regions.length} saved region${regions.length === 1 ? "" : "s"}`} data-testid="saved-marking">
        <image href={`/api/photos/${photo.id}/image?size=display`} x={0} y={0} width={W} height={H} preserveAspectRatio="none" />
        {regions.map((r) => {
          const common = { fill: "none", stroke: STROKE[r.state], strokeWidth: 2.5, vectorEffect: "non-scaling-stroke" as const, strokeDasharray: r.flagged ? "7 4" : undefined };
          const above = r.region.y - font - 4 > 0;
          return (
            <g key={r.id} data-testid="saved-region" data-state={r.state}>
              {r.region.shape === "rect" ? (
                <rect x={r.region.x} y={r.region.y} width={r.region.w} height={r.region.h} {...common} />
              ) : (
                <ellipse cx={r.region.x + r.region.w / 2} cy={r.region.y + r.region.h / 2} rx={r.region.w / 2} ry={r.region.h / 2} {...common} />
              )}
              <text x={r.region.x + 3} y={above ? r.region.y - 5 : r.region.y + font + 3} fontSize={font} fontWeight={700} fill={STROKE[r.state]} stroke="#111827" strokeWidth={3} paintOrder="stroke" vectorEffect="non-scaling-stroke">
                {r.label}
              </text>
            </g>
          );
        })}
      </svg>
      <figcaption className="text-xs text-ink-soft">
        Outlines: green accepted, teal waiting, red rejected; dashed = flagged. Numbers match the list. The photo is a screen copy; the numbers are the measurement.
      </figcaption>
    </figure>
  );
}
