/**
 * Names carry no colour words: the colour a dye shows is what the model and the measurements say.
 *
 * The invented demo scenario: the colour lab of "Kestrel Bay Coatings", a fictional company.
 * Every dye, code and response below is made up. Colours are generated from a physical-looking model so
 * that fits and searches find real structure:
 *
 *   ν̃max(solvent) = ν̃0 + s·π* + a·α + b·β   (kK, a Kamlet–Taft-shaped response, invented coefficients)
 *   A(ν̃) = Σ Apeak · exp(−½((ν̃ − ν̃max)/σ)²)   (Gaussian bands in wavenumber)
 *   acid/base forms mixed by the Henderson–Hasselbalch fraction 1 / (1 + 10^(pKa − pH))
 *
 * and the colour is the CIE colour of the transmitted D65 light (lib/color/spectrum).
 */
import { absorbanceToXyz, type SampledSpectrum } from "../../lib/color/spectrum";
import { WHITE_POINTS_2DEG } from "../../lib/color/illuminants";
import { xyzToLab } from "../../lib/color/lab";
import type { Lab, Xyz } from "../../lib/color/types";
import { mulberry32 as rng } from "../../lib/random";

export type Band = { nu0: number; s: number; a: number; b: number; sigma: number; peak: number };

export type DemoDye = {
  code: string;
  name: string;
  dyeClass: string;
  synonyms: string[];
  molarMass: number;
  notes: string;
  hazards: string;
  /** Neutral (or acid) form. */
  band: Band;
  /**
   * Specific solvation the scales do not describe: extra shift of the band, kK, in named solvents
   * (e.g. a hydrogen bond to water stronger than α predicts). Invented.
   */
  departures?: Record<string, number>;
  /** A second band that moves with the first (a dye no single band explains). Offset of its centre, kK. */
  secondBand?: { offset: number; peak: number; sigma: number };
  /** Only these solvents were measured (e.g. a dye tried in aprotic solvents only). */
  panel?: string[];
  /** Base form, for dyes with an acid/base response. */
  baseBand?: Band;
  pKa?: number;
};

export type SolventParams = { alpha: number; beta: number; piStar: number; name?: string };

export { gaussian, mulberry32 as rng } from "../../lib/random";

const HAZ_GENERIC = "Handle as a possible skin sensitizer: gloves, avoid dust; see the supplier's SDS.";

type Template = {
  dyeClass: string;
  prefix: string;
  names: string[];
  band: () => Band;
  acidBase?: boolean;
  hazards?: string;
};

/** Invented families: coefficient ranges chosen to look like the sign and size of real solvatochromism. */
function families(random: () => number): Template[] {
  const pick = (lo: number, hi: number) => lo + (hi - lo) * random();
  return [
    {
      dyeClass: "betaine",
      prefix: "BT",
      names: ["Tidewater Betaine 1", "Tidewater Betaine 2", "Tidewater Betaine 4", "Tidewater Betaine 7"],
      band: () => ({ nu0: pick(12.8, 14.2), s: pick(2.0, 3.2), a: pick(5.5, 7.5), b: pick(-0.6, 0.4), sigma: pick(1.6, 2.1), peak: pick(0.9, 1.3) }),
    },
    {
      dyeClass: "merocyanine",
      prefix: "MC",
      names: ["Estuary Merocyanine A", "Estuary Merocyanine B", "Estuary Merocyanine C", "Estuary Merocyanine D", "Estuary Merocyanine E"],
      band: () => ({ nu0: pick(17.0, 19.5), s: pick(-1.8, 1.6), a: pick(1.8, 3.8), b: pick(-0.8, 0.8), sigma: pick(1.3, 1.8), peak: pick(1.0, 1.6) }),
    },
    {
      dyeClass: "azo",
      prefix: "AZ",
      names: ["Kestrel Azo 11", "Kestrel Azo 12", "Kestrel Azo 14", "Kestrel Azo 15", "Kestrel Azo 18"],
      band: () => ({ nu0: pick(19.5, 24.0), s: pick(-1.6, -0.6), a: pick(-0.6, 0.5), b: pick(-0.5, 0.2), sigma: pick(1.8, 2.5), peak: pick(1.0, 1.5) }),
      acidBase: true,
    },
    {
      dyeClass: "sulfonephthalein",
      prefix: "SP",
      names: ["Shoal Indicator 2", "Shoal Indicator 3", "Shoal Indicator 5", "Shoal Indicator 8"],
      band: () => ({ nu0: pick(22.5, 24.5), s: pick(-0.6, 0), a: pick(-0.3, 0.3), b: pick(-0.2, 0.2), sigma: pick(1.6, 2.0), peak: pick(0.9, 1.3) }),
      acidBase: true,
    },
    {
      dyeClass: "xanthene",
      prefix: "XN",
      names: ["Harbour Xanthene 21", "Harbour Xanthene 22", "Harbour Xanthene 23", "Harbour Xanthene 25"],
      band: () => ({ nu0: pick(18.0, 20.0), s: pick(-0.9, -0.3), a: pick(0.2, 0.9), b: pick(-0.3, 0.3), sigma: pick(0.9, 1.3), peak: pick(1.2, 1.8) }),
      acidBase: true,
    },
    {
      dyeClass: "triarylmethane",
      prefix: "TM",
      names: ["Gannet Triarylmethane 31", "Gannet Triarylmethane 32", "Gannet Triarylmethane 33", "Gannet Triarylmethane 34"],
      band: () => ({ nu0: pick(16.0, 17.6), s: pick(-0.8, -0.2), a: pick(-0.4, 0.3), b: pick(-0.3, 0.3), sigma: pick(1.1, 1.5), peak: pick(1.3, 1.9) }),
      acidBase: true,
    },
    {
      dyeClass: "coumarin",
      prefix: "CM",
      names: ["Marram Coumarin 41", "Marram Coumarin 43", "Marram Coumarin 47"],
      band: () => ({ nu0: pick(23.5, 25.5), s: pick(-2.2, -1.0), a: pick(-1.4, -0.4), b: pick(-0.6, 0.0), sigma: pick(1.7, 2.3), peak: pick(0.8, 1.2) }),
    },
    {
      dyeClass: "anthraquinone",
      prefix: "AQ",
      names: ["Skerry Quinone 51", "Skerry Quinone 52", "Skerry Quinone 55"],
      band: () => ({ nu0: pick(16.5, 19.0), s: pick(-0.7, -0.2), a: pick(-0.5, 0.1), b: pick(-0.2, 0.2), sigma: pick(1.8, 2.4), peak: pick(0.9, 1.3) }),
    },
    {
      dyeClass: "nitrophenolate",
      prefix: "NP",
      names: ["Pier Nitrophenolate 61", "Pier Nitrophenolate 62"],
      band: () => ({ nu0: pick(27.5, 29.0), s: pick(-1.5, -0.8), a: pick(0.8, 1.6), b: pick(-0.4, 0.0), sigma: pick(2.2, 2.8), peak: pick(0.9, 1.3) }),
      acidBase: true,
    },
  ];
}

export function demoDyes(): DemoDye[] {
  const random = rng(20261202);
  const dyes: DemoDye[] = [];
  let serial = 100;
  for (const fam of families(random)) {
    for (const name of fam.names) {
      serial += 7;
      const band = fam.band();
      const dye: DemoDye = {
        code: `KB-${fam.prefix}-${serial}`,
        name,
        dyeClass: fam.dyeClass,
        synonyms: [`${fam.prefix}${serial}`, `${name.split(" ")[0]} ${fam.prefix}-${serial}`],
        molarMass: Math.round((280 + 420 * random()) * 100) / 100,
        notes: `Invented demo dye of the ${fam.dyeClass} family (Kestrel Bay Coatings demo scenario).`,
        hazards: fam.hazards ?? HAZ_GENERIC,
        band,
      };
      if (fam.acidBase) {
        // The base form absorbs at lower energy (bathochromic), as typical for phenolate/azo indicators.
        dye.baseBand = { ...band, nu0: band.nu0 - (3.0 + 3.5 * random()), peak: band.peak * (1.1 + 0.4 * random()) };
        dye.pKa = Math.round((3 + 7 * random()) * 10) / 10;
      }
      dyes.push(dye);
    }
  }
  return addDepartures(dyes);
}

/** Deterministic per-name numbers that leave the shared random sequence (and so the rest of the demo) untouched. */
function hashed(text: string): () => number {
  let h = 2166136261;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 16777619);
  return rng(h >>> 0);
}

const APROTIC_PANEL = ["N,N-Dimethylformamide", "Dimethyl sulfoxide", "N-Methyl-2-pyrrolidone", "Pyridine", "Tetrahydrofuran", "Ethyl acetate", "1,4-Dioxane", "Toluene", "Cyclohexane", "n-Hexane"];

/**
 * Realistic departures from the linear band model, so fits have something to be honest about (all
 * invented): betaines and merocyanines are hydrogen-bonded more strongly than α says in water,
 * ethylene glycol and trifluoroethanol and shifted in pyridine (specific solvation); every dye gets a small
 * solvent-specific scatter; one anthraquinone absorbs in two regions (no single band explains its colours);
 * one coumarin was only ever measured in solvents with α = 0 (none donates a hydrogen bond: its Kamlet–Taft fit must be refused).
 */
function addDepartures(dyes: DemoDye[]): DemoDye[] {
  for (const dye of dyes) {
    const r = hashed(dye.code);
    const departures: Record<string, number> = {};
    for (const name of ["Water", "Methanol", "Ethanol", "2-Propanol", "tert-Butanol", "Ethylene glycol", "Benzyl alcohol", "2,2,2-Trifluoroethanol", "Acetone", "2-Butanone", "Acetonitrile", "N,N-Dimethylformamide", "Dimethyl sulfoxide", "N-Methyl-2-pyrrolidone", "Pyridine", "Dichloromethane", "Tetrahydrofuran", "Ethyl acetate", "Chloroform", "1,4-Dioxane", "Toluene", "Cyclohexane", "n-Hexane"]) {
      departures[name] = 0.06 * (2 * r() - 1);
    }
    if (dye.dyeClass === "betaine" || dye.dyeClass === "merocyanine") {
      departures.Water += 0.35 + 0.2 * r();
      departures["Ethylene glycol"] += 0.2 + 0.15 * r();
      departures["2,2,2-Trifluoroethanol"] -= 0.3 + 0.2 * r();
      departures.Pyridine -= 0.15 + 0.1 * r();
    }
    dye.departures = departures;
  }
  const twoBand = dyes.find((d) => d.name === "Skerry Quinone 55");
  if (twoBand) twoBand.secondBand = { offset: 7.2, peak: twoBand.band.peak * 0.9, sigma: 1.2 };
  const aproticOnly = dyes.find((d) => d.name === "Marram Coumarin 47");
  if (aproticOnly) aproticOnly.panel = APROTIC_PANEL;
  return dyes;
}

function bandCentre(band: Band, solvent: SolventParams, departures?: Record<string, number>): number {
  const specific = solvent.name && departures ? (departures[solvent.name] ?? 0) : 0;
  return band.nu0 + band.s * solvent.piStar + band.a * solvent.alpha + band.b * solvent.beta + specific;
}

/** Absorbance spectrum (380–780 nm, 2 nm) of a dye in a solvent at a pH (null = unbuffered, neutral form). */
export function demoSpectrum(dye: DemoDye, solvent: SolventParams, pH: number | null, scale = 1): SampledSpectrum {
  const wavelengths: number[] = [];
  const values: number[] = [];
  const fractionBase = dye.baseBand && dye.pKa !== undefined && pH !== null ? 1 / (1 + Math.pow(10, dye.pKa - pH)) : 0;
  for (let nm = 380; nm <= 780; nm += 2) {
    const nu = 1e4 / nm; // kK
    let a = 0;
    const acidCentre = bandCentre(dye.band, solvent, dye.departures);
    a += (1 - fractionBase) * dye.band.peak * Math.exp(-0.5 * ((nu - acidCentre) / dye.band.sigma) ** 2);
    if (dye.secondBand) {
      a += (1 - fractionBase) * dye.secondBand.peak * Math.exp(-0.5 * ((nu - acidCentre - dye.secondBand.offset) / dye.secondBand.sigma) ** 2);
    }
    if (dye.baseBand && fractionBase > 0) {
      const baseCentre = bandCentre(dye.baseBand, solvent, dye.departures);
      a += fractionBase * dye.baseBand.peak * Math.exp(-0.5 * ((nu - baseCentre) / dye.baseBand.sigma) ** 2);
    }
    wavelengths.push(nm);
    values.push(a * scale);
  }
  return { wavelengths, values };
}

export function demoColour(dye: DemoDye, solvent: SolventParams, pH: number | null): { xyz: Xyz; lab: Lab } {
  const xyz = absorbanceToXyz(demoSpectrum(dye, solvent, pH), "D65");
  return { xyz, lab: xyzToLab(xyz, WHITE_POINTS_2DEG.D65) };
}
