"use client";

import { CartesianGrid, ComposedChart, Line, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";

export type TitrationPoint = { pH: number; fraction: number; hex: string };

/**
 * Titration curve: each vial's base fraction read from its colour on the fitted model's path, against
 * pH, with the fitted Henderson–Hasselbalch curve, the pKa and the visual transition interval.
 */
export function TitrationChart({ vials, curve, pKa, transition, label }: { vials: TitrationPoint[]; curve: { pH: number; fraction: number }[]; pKa: number; transition: [number, number]; label: string }) {
  const lo = Math.floor(Math.min(...vials.map((v) => v.pH), transition[0]));
  const hi = Math.ceil(Math.max(...vials.map((v) => v.pH), transition[1]));
  return (
    <figure aria-label={`Titration curve: ${label}`} data-testid="titration-curve" className="h-64 w-full">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart margin={{ top: 22, right: 12, bottom: 20, left: 4 }}>
          <CartesianGrid strokeDasharray="3 3" stroke="#e3e6ec" />
          <XAxis type="number" dataKey="pH" domain={[lo, hi]} tickCount={hi - lo + 1} label={{ value: "pH", position: "insideBottom", offset: -10 }} />
          <YAxis type="number" dataKey="fraction" domain={[0, 1]} width={66} label={{ value: "base fraction", angle: -90, position: "insideLeft", offset: 0, style: { textAnchor: "middle" } }} />
          <ReferenceArea x1={transition[0]} x2={transition[1]} fill="#c9d3ea" fillOpacity={0.35} ifOverflow="extendDomain" />
          <ReferenceLine x={pKa} stroke="#3b4a6b" strokeDasharray="4 3" label={{ value: `pKa ${pKa.toFixed(2)}`, position: "top", fontSize: 11 }} />
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
