"use client";

import { useMemo, useState } from "react";
import { CartesianGrid, Legend, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { WhitePointName } from "@/lib/color/illuminants";
import { lambdaMax, spectrumColour } from "@/lib/color/spectrum";

export type ChartSpectrum = { id: string; label: string; points: [number, number][]; concentrationUmolL: number | null; pathLengthMm: number | null; /** Where it was measured (instrument, file), shown beside it. */ source?: string };

const PALETTE = ["#3b4a6b", "#b5542f", "#2f7d5b", "#7a3fa0", "#a07a1f", "#1f6fa0"];

/**
 * Absorbance spectra of one dye overlaid across solvents, λmax marked (the longest-wavelength visible
 * band maximum), and each spectrum's colour under a chosen illuminant at a chosen concentration × path
 * length, by Beer–Lambert scaling of the measured absorbance.
 */
export function SpectraChart({ spectra }: { spectra: ChartSpectrum[] }) {
  const [illuminant, setIlluminant] = useState<WhitePointName>("D65");
  const [concentration, setConcentration] = useState("20");
  const [path, setPath] = useState("10");
  const c = Number(concentration);
  const l = Number(path);
  const valid = Number.isFinite(c) && c >= 0 && Number.isFinite(l) && l >= 0;
  const rows = useMemo(() => {
    const byNm = new Map<number, Record<string, number>>();
    spectra.forEach((s) => s.points.forEach(([nm, a]) => byNm.set(nm, { ...(byNm.get(nm) ?? { nm }), [s.id]: a })));
    return [...byNm.values()].sort((x, y) => x.nm - y.nm);
  }, [spectra]);
  const facts = spectra.map((s) => {
    const sampled = { wavelengths: s.points.map((p) => p[0]), values: s.points.map((p) => p[1]) };
    const measuredCl = (s.concentrationUmolL ?? 0) * (s.pathLengthMm ?? 0);
    const scale = valid && measuredCl > 0 ? (c * l) / measuredCl : 1;
    const colour = spectrumColour(sampled, illuminant, scale);
    return { s, peak: lambdaMax(sampled), colour, scale };
  });
  return (
    <div>
      <form className="mb-3 flex flex-wrap items-end gap-3 text-sm" aria-label="Colour from the spectra" onSubmit={(e) => e.preventDefault()}>
        <label className="flex flex-col">
          Illuminant
          <select value={illuminant} onChange={(e) => setIlluminant(e.target.value as WhitePointName)} className="rounded border border-line px-2 py-1">
            <option value="D65">D65 (daylight)</option>
            <option value="D50">D50</option>
            <option value="A">A (tungsten)</option>
          </select>
        </label>
        <label className="flex flex-col">
          Concentration (µmol/L)
          <input inputMode="decimal" value={concentration} onChange={(e) => setConcentration(e.target.value)} className="w-28 rounded border border-line px-2 py-1" />
        </label>
        <label className="flex flex-col">
          Path length (mm)
          <input inputMode="decimal" value={path} onChange={(e) => setPath(e.target.value)} className="w-24 rounded border border-line px-2 py-1" />
        </label>
        {!valid && <p className="text-bad">Give the concentration and path length as numbers of 0 or more, e.g. 20 and 10.</p>}
      </form>
      <figure aria-label="Absorbance spectra" data-testid="spectra-chart" className="h-72 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={rows} margin={{ top: 8, right: 12, bottom: 20, left: 4 }}>
            <CartesianGrid strokeDasharray="3 3" stroke="#e3e6ec" />
            <XAxis dataKey="nm" type="number" domain={["dataMin", "dataMax"]} label={{ value: "wavelength (nm)", position: "insideBottom", offset: -10 }} />
            <YAxis domain={[(min: number) => Math.min(0, Math.floor(min * 20) / 20), "auto"]} label={{ value: "absorbance (as measured)", angle: -90, position: "insideLeft", offset: 12, fontSize: 12, style: { textAnchor: "middle" } }} />
            <Tooltip formatter={(v) => (typeof v === "number" ? v.toFixed(3) : String(v))} labelFormatter={(nm) => `${nm} nm`} />
            <Legend verticalAlign="top" height={24} />
            {spectra.map((s, i) => (
              <Line key={s.id} dataKey={s.id} name={s.label} dot={false} stroke={PALETTE[i % PALETTE.length]} strokeWidth={1.8} isAnimationActive={false} connectNulls />
            ))}
            {facts.map((f, i) => (f.peak !== null ? <ReferenceLine key={f.s.id} x={f.peak} stroke={PALETTE[i % PALETTE.length]} strokeDasharray="3 3" /> : null))}
          </LineChart>
        </ResponsiveContainer>
      </figure>
      <div className="mt-3 overflow-x-auto">
      <table className="w-full min-w-[36rem] text-left text-sm">
        <thead className="text-xs text-ink-soft">
          <tr>
            <th className="py-1 pr-2">Colour ({illuminant})</th>
            <th className="py-1 pr-2">Spectrum</th>
            <th className="py-1 pr-2 text-right">λmax (nm)</th>
            <th className="py-1 pr-2 text-right">ν̃max (cm⁻¹)</th>
            <th className="py-1 pr-2 text-right">E<sub>T</sub> (kcal/mol)</th>
            <th className="py-1 pr-2 text-right">L*, a*, b*</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line">
          {facts.map(({ s, peak, colour, scale }) => (
            <tr key={s.id} data-testid="spectrum-row">
              <td className="py-1 pr-2">
                <span className="inline-block h-6 w-6 rounded border border-black/10" style={{ backgroundColor: colour.hex }} title={`× ${scale.toFixed(2)} of the measured absorbance`} />
              </td>
              <td className="py-1 pr-2">
                {s.label}
                {s.source && <span className="block text-xs text-ink-soft">{s.source}</span>}
              </td>
              <td className="py-1 pr-2 text-right tabular-nums">{peak === null ? "no band in the visible" : peak.toFixed(1)}</td>
              <td className="py-1 pr-2 text-right tabular-nums">{peak === null ? "—" : Math.round(1e7 / peak).toLocaleString("en-GB")}</td>
              <td className="py-1 pr-2 text-right tabular-nums">{colour.transitionEnergyKcalMol === null ? "—" : colour.transitionEnergyKcalMol.toFixed(1)}</td>
              <td className="py-1 pr-2 text-right tabular-nums">{colour.lab.map((v) => v.toFixed(1)).join(", ")}</td>
            </tr>
          ))}
        </tbody>
      </table>
      </div>
    </div>
  );
}
