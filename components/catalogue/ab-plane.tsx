import { labD65ToHex } from "@/lib/color/display";
import type { Lab } from "@/lib/color/types";

export type PlanePoint = { lab: Lab; label: string; medium: "protic" | "dipolar-aprotic" | "nonpolar"; acidBase: "acid" | "neutral" | "base" };

const MARKER = { protic: "circle", "dipolar-aprotic": "square", nonpolar: "diamond" } as const;

/**
 * The CIELAB a*b* plane (D65) with one point per condition, filled with its screen colour; marker
 * shape gives the medium class, a dark ring marks acid or base conditions. The axes scale to the
 * data, never below ±40, so small shifts stay visible.
 */
export function AbPlane({ points, size = 360 }: { points: PlanePoint[]; size?: number }) {
  const extent = Math.max(40, ...points.map((p) => Math.max(Math.abs(p.lab[1]), Math.abs(p.lab[2])) * 1.1));
  const step = extent > 100 ? 50 : extent > 50 ? 25 : 10;
  const pad = 28;
  const scale = (size / 2 - pad) / extent;
  const x = (a: number) => size / 2 + a * scale;
  const y = (b: number) => size / 2 - b * scale;
  const ticks: number[] = [];
  for (let t = -Math.floor(extent / step) * step; t <= extent; t += step) ticks.push(t);
  return (
    <figure>
      <svg viewBox={`0 0 ${size} ${size}`} width="100%" style={{ maxWidth: size }} role="img" aria-label={`a*b* plane with ${points.length} conditions`}>
        <rect x={0} y={0} width={size} height={size} fill="#f7f7f6" />
        {ticks.map((t) => (
          <g key={t} stroke="#dcdcda" strokeWidth={t === 0 ? 1.5 : 0.75}>
            <line x1={x(t)} x2={x(t)} y1={pad / 2} y2={size - pad / 2} />
            <line y1={y(t)} y2={y(t)} x1={pad / 2} x2={size - pad / 2} />
          </g>
        ))}
        {ticks
          .filter((t) => t !== 0)
          .map((t) => (
            <g key={`l${t}`} fontSize={9} fill="#4a4a48">
              <text x={x(t)} y={size / 2 + 11} textAnchor="middle">
                {t}
              </text>
              <text x={size / 2 + 4} y={y(t) + 3}>
                {t}
              </text>
            </g>
          ))}
        <text x={size - 6} y={size / 2 - 6} textAnchor="end" fontSize={11} fill="#161616">
          +a* (red)
        </text>
        <text x={size / 2 + 6} y={14} fontSize={11} fill="#161616">
          +b* (yellow)
        </text>
        {points.map((p, i) => {
          const cx = x(p.lab[1]);
          const cy = y(p.lab[2]);
          const fill = labD65ToHex(p.lab);
          const stroke = p.acidBase === "neutral" ? "#161616" : "#7a1f1f";
          const sw = p.acidBase === "neutral" ? 0.8 : 2;
          const title = <title>{`${p.label}: L* ${p.lab[0].toFixed(1)}, a* ${p.lab[1].toFixed(1)}, b* ${p.lab[2].toFixed(1)}`}</title>;
          if (MARKER[p.medium] === "circle") return <circle key={i} cx={cx} cy={cy} r={6} fill={fill} stroke={stroke} strokeWidth={sw}>{title}</circle>;
          if (MARKER[p.medium] === "square") return <rect key={i} x={cx - 5.5} y={cy - 5.5} width={11} height={11} fill={fill} stroke={stroke} strokeWidth={sw}>{title}</rect>;
          return <polygon key={i} points={`${cx},${cy - 7} ${cx + 7},${cy} ${cx},${cy + 7} ${cx - 7},${cy}`} fill={fill} stroke={stroke} strokeWidth={sw}>{title}</polygon>;
        })}
      </svg>
      <figcaption className="mt-1 text-xs text-ink-soft">● protic · ■ dipolar aprotic · ◆ non-polar; a red ring marks acid or base conditions. Hover a point for its values; every value is also in the Measurements table.</figcaption>
    </figure>
  );
}
