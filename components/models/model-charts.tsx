"use client";

import { CartesianGrid, Legend, Line, ComposedChart, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis, ErrorBar } from "recharts";

export type ScalePoint = { solvent: string; x: number; observed: number; fitted: number; loo: number };

const fmt = (v: number) => Math.round(v).toLocaleString("en-GB");

/**
 * ν̃ against the scale (for Kamlet–Taft, the fitted combination s·π* + a·α + b·β), the fitted line, and
 * predicted-vs-observed with the leave-one-out points. Filled circles are measured band positions,
 * open triangles the leave-one-out predictions, so the chart reads without colour.
 */
export function ScaleChart({
  points,
  xLabel,
  xDecimals,
  predictions,
  observedLabel = "measured ν̃ (apparent band)",
}: {
  points: ScalePoint[];
  xLabel: string;
  xDecimals: number;
  predictions?: { solvent: string; x: number; value: number; halfWidth: number }[];
  /** What the filled circles are: apparent bands from colours, or band maxima from spectra. */
  observedLabel?: string;
}) {
  const slopeLine = [...points].sort((a, b) => a.x - b.x).map((p) => ({ x: p.x, line: p.fitted }));
  // The axis spans the predictions and their intervals too, so no predicted point is drawn outside the plot.
  const ys = [...points.flatMap((p) => [p.observed, p.fitted, p.loo]), ...(predictions ?? []).flatMap((p) => [p.value - p.halfWidth, p.value + p.halfWidth])];
  const yDomain: [number, number] | ["auto", "auto"] = ys.length ? [Math.floor(Math.min(...ys) / 500) * 500, Math.ceil(Math.max(...ys) / 500) * 500] : ["auto", "auto"];
  return (
    <figure>
      <div style={{ width: "100%", height: 280 }}>
        <ResponsiveContainer>
          <ComposedChart margin={{ top: 10, right: 16, bottom: 28, left: 16 }}>
            <CartesianGrid stroke="#e4e1da" />
            <XAxis type="number" dataKey="x" domain={["auto", "auto"]} tickFormatter={(v: number) => v.toLocaleString("en-GB", { maximumFractionDigits: xDecimals, minimumFractionDigits: xDecimals })} label={{ value: xLabel, position: "insideBottom", offset: -16 }} />
            <YAxis type="number" domain={yDomain} tickFormatter={fmt} width={78} label={{ value: "ν̃ / cm⁻¹", angle: -90, position: "insideLeft", offset: 0, style: { textAnchor: "middle" } }} />
            <Tooltip formatter={(v: unknown) => (typeof v === "number" ? `${fmt(v)} cm⁻¹` : String(v))} />
            {/* Legend text in ink: it would otherwise take each series' fill, white for the predictions. */}
            <Legend verticalAlign="top" wrapperStyle={{ fontSize: 13, paddingBottom: 4 }} formatter={(value: string) => <span style={{ color: "#1d2433" }}>{value}</span>} />
            <Line data={slopeLine} dataKey="line" name="fit" stroke="#1d2433" dot={false} strokeWidth={1.5} isAnimationActive={false} />
            <Scatter data={points.map((p) => ({ x: p.x, y: p.observed, solvent: p.solvent }))} dataKey="y" name={observedLabel} fill="#1d2433" shape="circle" isAnimationActive={false} />
            <Scatter data={points.map((p) => ({ x: p.x, y: p.loo, solvent: p.solvent }))} dataKey="y" name="leave-one-out prediction" fill="none" stroke="#8a4b00" shape="triangle" isAnimationActive={false} />
            {predictions && predictions.length > 0 && (
              <Scatter data={predictions.map((p) => ({ x: p.x, y: p.value, e: p.halfWidth, solvent: p.solvent }))} dataKey="y" name="predicted (unmeasured solvent, 95 % interval)" fill="#ffffff" stroke="#3b4cc0" shape="diamond" isAnimationActive={false}>
                <ErrorBar dataKey="e" direction="y" stroke="#3b4cc0" />
              </Scatter>
            )}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

/** Observed vs leave-one-out predicted ν̃ with the 1:1 line; residuals are the vertical distances. */
export function ObservedPredictedChart({ points }: { points: ScalePoint[] }) {
  const all = points.flatMap((p) => [p.observed, p.loo]);
  const lo = Math.floor(Math.min(...all) / 500) * 500;
  const hi = Math.ceil(Math.max(...all) / 500) * 500;
  return (
    <div style={{ width: "100%", height: 280 }}>
      <ResponsiveContainer>
        <ComposedChart margin={{ top: 10, right: 16, bottom: 28, left: 16 }}>
          <CartesianGrid stroke="#e4e1da" />
          <XAxis type="number" dataKey="x" domain={["auto", "auto"]} tickFormatter={fmt} label={{ value: "observed ν̃ / cm⁻¹", position: "insideBottom", offset: -16 }} />
          <YAxis type="number" domain={["auto", "auto"]} tickFormatter={fmt} width={78} label={{ value: "predicted ν̃ / cm⁻¹", angle: -90, position: "insideLeft", offset: 0, style: { textAnchor: "middle" } }} />
          <Tooltip formatter={(v: unknown) => (typeof v === "number" ? `${fmt(v)} cm⁻¹` : String(v))} />
          <Legend verticalAlign="top" wrapperStyle={{ fontSize: 13, paddingBottom: 4 }} />
          <Line data={[{ x: lo, y: lo }, { x: hi, y: hi }]} dataKey="y" name="observed = predicted" stroke="#8b8578" strokeDasharray="4 4" dot={false} isAnimationActive={false} />
          <Scatter data={points.map((p) => ({ x: p.observed, y: p.fitted, solvent: p.solvent }))} dataKey="y" name="fitted (all solvents)" fill="#1d2433" shape="circle" isAnimationActive={false} />
          <Scatter data={points.map((p) => ({ x: p.observed, y: p.loo, solvent: p.solvent }))} dataKey="y" name="leave-one-out" fill="none" stroke="#8a4b00" shape="triangle" isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
