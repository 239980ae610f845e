"use client";

import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

/** ΔE00 over time (check standards or drift) with a limit line; every point is also listed in a table below it. */
export function HistoryChart({ points, limit, label }: { points: { at: string; deltaE00: number; name: string }[]; limit?: number; label: string }) {
  if (points.length === 0) return <p className="text-sm text-ink-soft">No readings yet.</p>;
  return (
    <figure>
      <div className="h-56 w-full" role="img" aria-label={label}>
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={points} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
            <CartesianGrid strokeDasharray="3 3" />
            <XAxis dataKey="at" tick={{ fontSize: 11 }} />
            <YAxis tick={{ fontSize: 11 }} label={{ value: "ΔE00", angle: -90, position: "insideLeft", fontSize: 11 }} />
            <Tooltip formatter={(v) => [`${Number(v).toFixed(2)} ΔE00`, "difference"]} />
            {limit !== undefined && <ReferenceLine y={limit} stroke="#b45309" strokeDasharray="4 4" />}
            <Line type="monotone" dataKey="deltaE00" stroke="#6b2fa0" dot />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-ink-soft">{label}</figcaption>
    </figure>
  );
}
