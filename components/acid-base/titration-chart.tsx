"use client";

import { CartesianGrid, ComposedChart, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";

export type TitrationPoint = { pH: number; fraction: number; hex: string };

/**
 * Titration curve: each vial's position read from its colour on the fitted model's path, against pH,
 * with the fitted curve, the pKa('s) and the visual transition interval(s). One step: base fraction
 * 0–1; two steps: protons released per dye, 0–2 (`yMax`).
 */
export function TitrationChart({
  vials,
  curve,
  pKas,
  transitions,
  label,
  yLabel = "base fraction",
  yMax = 1,
}: {
  vials: TitrationPoint[];
  curve: { pH: number; fraction: number }[];
  pKas: number[];
  transitions: [number, number][];
  label: string;
  yLabel?: string;
  yMax?: number;
}) {
  const lo = Math.floor(Math.min(...vials.map((v) => v.pH), ...transitions.map((t) => t[0])));
  const hi = Math.ceil(Math.max(...vials.map((v) => v.pH), ...transitions.map((t) => t[1])));
  const names = pKas.length > 1 ? pKas.map((_, i) => `pKa${"₁₂"[i]}`) : ["pKa"];
  return (
    <figure aria-label={`Titration curve: ${label}`} data-testid="titration-curve" className="h-64 w-full">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart margin={{ top: 22, right: 12, bottom: 20, left: 4 }}>
          <CartesianGrid strokeDasharray="3 3" stroke="#e3e6ec" />
          <XAxis type="number" dataKey="pH" domain={[lo, hi]} tickCount={Math.min(hi - lo + 1, 15)} label={{ value: "pH", position: "insideBottom", offset: -10 }} />
          <YAxis type="number" dataKey="fraction" domain={[0, yMax]} width={66} label={{ value: yLabel, angle: -90, position: "insideLeft", offset: 0, style: { textAnchor: "middle" } }} />
          {transitions.map(([x1, x2], i) => (
            <ReferenceArea key={`t${i}`} x1={x1} x2={x2} fill="#c9d3ea" fillOpacity={0.35} ifOverflow="extendDomain" data-testid="transition-band" />
          ))}
          {pKas.map((pKa, i) => (
            <ReferenceLine key={`p${i}`} x={pKa} stroke="#3b4a6b" strokeDasharray="4 3" label={{ value: `${names[i]} ${pKa.toFixed(2)}`, position: "top", fontSize: 11 }} />
          ))}
          <Line data={curve} dataKey="fraction" dot={false} stroke="#3b4a6b" strokeWidth={2} isAnimationActive={false} name="fitted model" />
          <Scatter
            data={vials}
            name="vials"
            isAnimationActive={false}
            shape={(props: { cx?: number; cy?: number; payload?: TitrationPoint }) => (
              <circle cx={props.cx} cy={props.cy} r={6} fill={props.payload?.hex ?? "#888"} stroke="#1d2433" strokeWidth={1} />
            )}
          />
          <Tooltip formatter={(v) => (typeof v === "number" ? v.toFixed(2) : String(v))} />
        </ComposedChart>
      </ResponsiveContainer>
    </figure>
  );
}
