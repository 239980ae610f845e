/**
 * Builds the curated solvent table from the reference files in db/reference (see its SOURCES.md).
 * Every value keeps the name of the file it came from; nothing is interpolated or filled in.
 */
import fs from "node:fs";
import path from "node:path";
import Papa from "papaparse";
import { classifyMedium, etnFromEt30 } from "../../lib/solvents/parameters";
import type { NewSolvent } from "../schema";

export const REFERENCE_DIR = path.join(process.cwd(), "db", "reference");

export const SOURCES = {
  et30: "ET(30): v-saini/ET30-NN data set (Reichardt's compilations, edition not stated)",
  et30Water: "ET(30): Reichardt, Chem. Rev. 94 (1994) 2319 — from memory",
  kamletTaft: "Kamlet–Taft: pcyep7/Solvent-selection table (π* agrees with Marcus 1993 where checked)",
  piStarMarcus: "π*: Marcus 1993 via Gu et al., Int. J. Pharm. (2004)",
  permittivityLide: "εr: Lide 1995 (CRC Handbook) via Gu et al., Int. J. Pharm. (2004)",
  permittivityKt: "εr: pcyep7/Solvent-selection table (uncited)",
  medium: "common practice, no source: O–H/N–H donor = protic; aprotic εr ≥ 5 = dipolar aprotic",
} as const;

type PanelEntry = {
  name: string;
  synonyms?: string[];
  /** Name in solvents_et30_secondary.csv; null where the file lacks the solvent. */
  et30Key: string | null;
  ktKey: string | null;
  guKey: string | null;
  hBondDonor: boolean;
  cautions: string;
};

const FLAMMABLE = "Highly flammable: no open flames or hot plates; work in a fume hood.";

/** The solvent panel Solvatlas ships. Cautions are the usual ones; the supplier's SDS governs. */
export const SOLVENT_PANEL: PanelEntry[] = [
  { name: "Water", et30Key: null, ktKey: "Water", guKey: "Water", hBondDonor: true, cautions: "" },
  { name: "Methanol", synonyms: ["MeOH"], et30Key: "methanol", ktKey: "Methanol", guKey: "Methanol", hBondDonor: true, cautions: `${FLAMMABLE} Toxic by ingestion, inhalation and through skin (optic nerve damage).` },
  { name: "Ethanol", synonyms: ["EtOH"], et30Key: "ethanol", ktKey: "Ethanol", guKey: "Ethanol", hBondDonor: true, cautions: FLAMMABLE },
  { name: "1-Propanol", synonyms: ["n-propanol"], et30Key: "1-propanol", ktKey: null, guKey: "1-propanol", hBondDonor: true, cautions: FLAMMABLE },
  { name: "2-Propanol", synonyms: ["isopropanol", "IPA"], et30Key: "2-propanol", ktKey: "Isopropyl alcohol", guKey: "2-propanol", hBondDonor: true, cautions: FLAMMABLE },
  { name: "1-Butanol", synonyms: ["n-butanol"], et30Key: "1-butanol", ktKey: null, guKey: "1-butanol", hBondDonor: true, cautions: "Flammable; irritates eyes and skin." },
  { name: "tert-Butanol", synonyms: ["2-methyl-2-propanol", "t-BuOH"], et30Key: "tert-butyl alcohol", ktKey: "t-Butanol", guKey: "2-methyl-2-propanol", hBondDonor: true, cautions: FLAMMABLE },
  { name: "Ethylene glycol", synonyms: ["1,2-ethanediol"], et30Key: "glycol", ktKey: "Ethylene glycol", guKey: "Ethylene glycol", hBondDonor: true, cautions: "Harmful if swallowed." },
  { name: "2-Methoxyethanol", synonyms: ["methyl cellosolve"], et30Key: "2-methoxyethanol", ktKey: "2-Methoxyethanol", guKey: "2-methoxyethanol", hBondDonor: true, cautions: "Reproductive toxicant: avoid skin contact and vapour; fume hood and gloves." },
  { name: "Benzyl alcohol", et30Key: "benzylalcohol", ktKey: "Benzyl alcohol", guKey: "Benzyl alcohol", hBondDonor: true, cautions: "Harmful if swallowed or inhaled." },
  { name: "2,2,2-Trifluoroethanol", synonyms: ["TFE"], et30Key: "2,2,2-trifluoroethanol", ktKey: "trifluoroethanol", guKey: null, hBondDonor: true, cautions: "Toxic; causes serious eye damage; fume hood." },
  { name: "Acetic acid", synonyms: ["glacial acetic acid"], et30Key: "acetic acid", ktKey: "Acetic acid", guKey: "acetic acid", hBondDonor: true, cautions: "Corrosive: causes severe burns; flammable vapour." },
  { name: "Formamide", et30Key: "formamide", ktKey: null, guKey: null, hBondDonor: true, cautions: "Reproductive toxicant: gloves and fume hood." },
  { name: "Acetone", synonyms: ["propanone"], et30Key: "acetone", ktKey: "Acetone", guKey: "Acetone", hBondDonor: false, cautions: FLAMMABLE },
  { name: "2-Butanone", synonyms: ["methyl ethyl ketone", "MEK"], et30Key: "2-butanone", ktKey: "Methyl ethyl ketone", guKey: "Butanone", hBondDonor: false, cautions: FLAMMABLE },
  { name: "Cyclohexanone", et30Key: "cyclohexanone", ktKey: "Cyclohexanone", guKey: "Cyclohexanone", hBondDonor: false, cautions: "Flammable; harmful by inhalation." },
  { name: "Acetonitrile", synonyms: ["MeCN"], et30Key: "acetonitrile", ktKey: "Acetonitrile", guKey: "Acetonitrile", hBondDonor: false, cautions: `${FLAMMABLE} Harmful by all routes.` },
  { name: "N,N-Dimethylformamide", synonyms: ["DMF"], et30Key: "DMF", ktKey: "N,N-Dimethylformamide", guKey: "N,N-dimethylformamide", hBondDonor: false, cautions: "Reproductive toxicant, absorbed through skin: gloves rated for DMF, fume hood." },
  { name: "Dimethyl sulfoxide", synonyms: ["DMSO"], et30Key: "dimethyl sulfoxide", ktKey: "Dimethyl sulfoxide", guKey: "dimethylsulfoxide", hBondDonor: false, cautions: "Carries dissolved dyes through skin: wear suitable gloves." },
  { name: "N-Methyl-2-pyrrolidone", synonyms: ["NMP"], et30Key: "1-methylpyrrolidin-2-one", ktKey: "N-Methyl-2-pyrrolidone", guKey: "N-methyl-2-pyrrolidone", hBondDonor: false, cautions: "Reproductive toxicant, absorbed through skin: gloves and fume hood." },
  { name: "Nitromethane", et30Key: "nitromethane", ktKey: "Nitromethane", guKey: "Nitromethane", hBondDonor: false, cautions: "Flammable; may explode on heating or shock; keep away from amines and bases." },
  { name: "Nitrobenzene", et30Key: "nitrobenzene", ktKey: "nitrobenzene", guKey: null, hBondDonor: false, cautions: "Toxic by all routes, absorbed through skin; suspected carcinogen: fume hood and gloves." },
  { name: "Pyridine", et30Key: "pyridine", ktKey: "Pyridine", guKey: "Pyridine", hBondDonor: false, cautions: `${FLAMMABLE} Harmful; strong odour.` },
  { name: "Hexamethylphosphoramide", synonyms: ["HMPA"], et30Key: "hexamethylphosphuric acid triamide", ktKey: "Hexamethylphosphoramide", guKey: null, hBondDonor: false, cautions: "Carcinogen: avoid; use only with the safety officer's approval." },
  { name: "Dichloromethane", synonyms: ["DCM", "methylene chloride"], et30Key: "dichloromethane", ktKey: "Dichloromethane", guKey: "Dichloromethane", hBondDonor: false, cautions: "Suspected carcinogen; volatile; passes through many glove materials: fume hood." },
  { name: "1,2-Dichloroethane", synonyms: ["DCE"], et30Key: "1,2-dichloroethane", ktKey: "1,2-Dichloroethane", guKey: "1,2-dichloroethane", hBondDonor: false, cautions: `${FLAMMABLE} Carcinogen.` },
  { name: "Tetrahydrofuran", synonyms: ["THF", "oxolane"], et30Key: "oxolane", ktKey: "Tetrahydrofuran", guKey: "Tetrahydrofuran", hBondDonor: false, cautions: `${FLAMMABLE} Forms explosive peroxides on storage.` },
  { name: "Ethyl acetate", synonyms: ["EtOAc"], et30Key: "ethyl acetate", ktKey: "Ethyl acetate", guKey: "Ethyl acetate", hBondDonor: false, cautions: FLAMMABLE },
  { name: "Chloroform", synonyms: ["trichloromethane"], et30Key: "trichloromethane", ktKey: "Chloroform", guKey: "Chloroform", hBondDonor: false, cautions: "Harmful; suspected carcinogen: fume hood." },
  { name: "Diethyl ether", synonyms: ["ether"], et30Key: "diethyl ether", ktKey: "Diethyl ether", guKey: "Diethyl ether", hBondDonor: false, cautions: "Extremely flammable; forms explosive peroxides." },
  { name: "tert-Butyl methyl ether", synonyms: ["MTBE"], et30Key: "tert-butyl methyl ether", ktKey: "t-Butyl methyl ether", guKey: "Methyl tertiary-butyl ether", hBondDonor: false, cautions: FLAMMABLE },
  { name: "1,4-Dioxane", synonyms: ["dioxane"], et30Key: "1,4-dioxane", ktKey: "Dioxane", guKey: "1,4-dioxane", hBondDonor: false, cautions: `${FLAMMABLE} Suspected carcinogen; forms peroxides.` },
  { name: "Anisole", synonyms: ["methoxybenzene"], et30Key: "anisole", ktKey: "Anisole", guKey: "Anisole", hBondDonor: false, cautions: "Flammable." },
  { name: "Toluene", et30Key: "toluene", ktKey: "Toluene", guKey: "Toluene", hBondDonor: false, cautions: `${FLAMMABLE} Reproductive toxicant.` },
  { name: "Benzene", et30Key: "benzene", ktKey: "Benzene", guKey: "Benzene", hBondDonor: false, cautions: `${FLAMMABLE} Carcinogen: replace where possible.` },
  { name: "p-Xylene", et30Key: "p-xylene", ktKey: "p-Xylene", guKey: "p-Xylene", hBondDonor: false, cautions: FLAMMABLE },
  { name: "Carbon tetrachloride", synonyms: ["tetrachloromethane"], et30Key: "tetrachloromethane", ktKey: "Carbon tetrachloride", guKey: "Carbon tetrachloride", hBondDonor: false, cautions: "Toxic and carcinogenic; ozone-depleting: avoid." },
  { name: "Cyclohexane", et30Key: "cyclohexane", ktKey: "Cyclohexane", guKey: "Cyclohexane", hBondDonor: false, cautions: FLAMMABLE },
  { name: "n-Hexane", synonyms: ["hexane"], et30Key: "n-hexane", ktKey: "Hexane", guKey: "n-Hexane", hBondDonor: false, cautions: `${FLAMMABLE} Neurotoxic on long exposure.` },
  { name: "n-Heptane", synonyms: ["heptane"], et30Key: "n-heptane", ktKey: "Heptane", guKey: "n-Heptane", hBondDonor: false, cautions: FLAMMABLE },
];

const WATER_ET30_FROM_MEMORY = 63.1;

type Row = Record<string, string>;

export function readReferenceCsv(file: string, dir = REFERENCE_DIR): Row[] {
  const text = fs.readFileSync(path.join(dir, file), "utf8");
  const parsed = Papa.parse<Row>(text, { header: true, skipEmptyLines: true });
  if (parsed.errors.length > 0) {
    throw new Error(`${file}: ${parsed.errors[0].message} (row ${parsed.errors[0].row})`);
  }
  return parsed.data;
}

function num(value: string | undefined): number | null {
  if (value === undefined || value.trim() === "") return null;
  const n = Number(value);
  if (!Number.isFinite(n)) throw new Error(`Not a number in reference data: "${value}"`);
  return n;
}

function lookup(rows: Row[], column: string, key: string | null, file: string): Row | null {
  if (key === null) return null;
  const found = rows.find((r) => r[column] === key);
  if (!found) throw new Error(`${file} has no row named "${key}"`);
  return found;
}

/** Rows for the solvents table, in panel order, with ids derived from the names. */
export function buildSolventTable(dir = REFERENCE_DIR): (NewSolvent & { id: string })[] {
  const et30Rows = readReferenceCsv("solvents_et30_secondary.csv", dir);
  const ktRows = readReferenceCsv("solvents_kamlet_taft_secondary.csv", dir);
  const guRows = readReferenceCsv("solvents_gu2004_properties.csv", dir);

  return SOLVENT_PANEL.map((entry) => {
    const et = lookup(et30Rows, "solvent", entry.et30Key, "solvents_et30_secondary.csv");
    const kt = lookup(ktRows, "solvent", entry.ktKey, "solvents_kamlet_taft_secondary.csv");
    const gu = lookup(guRows, "solvent", entry.guKey, "solvents_gu2004_properties.csv");

    const et30 = et ? num(et.ET30_kcal_per_mol) : entry.name === "Water" ? WATER_ET30_FROM_MEMORY : null;
    const et30Source = et ? SOURCES.et30 : entry.name === "Water" ? SOURCES.et30Water : null;
    const alpha = kt ? num(kt.kt_alpha) : null;
    const beta = kt ? num(kt.kt_beta) : null;
    const ktPi = kt ? num(kt.kt_pi_star) : null;
    const guPi = gu ? num(gu.pi_star_Marcus1993) : null;
    const piStar = ktPi ?? guPi;
    const piStarSource = ktPi !== null ? SOURCES.kamletTaft : guPi !== null ? SOURCES.piStarMarcus : null;
    const lide = gu ? num(gu.dielectric_constant) : null;
    const ktEps = kt ? num(kt.dielectric_constant) : null;
    const permittivity = lide ?? ktEps;
    const permittivitySource = lide !== null ? SOURCES.permittivityLide : ktEps !== null ? SOURCES.permittivityKt : null;

    return {
      id: `solv-${entry.name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "")}`,
      name: entry.name,
      synonyms: entry.synonyms ?? [],
      et30,
      et30Source,
      etn: et30 === null ? null : etnFromEt30(et30),
      ktAlpha: alpha,
      ktAlphaSource: alpha === null ? null : SOURCES.kamletTaft,
      ktBeta: beta,
      ktBetaSource: beta === null ? null : SOURCES.kamletTaft,
      ktPiStar: piStar,
      ktPiStarSource: piStarSource,
      permittivity,
      permittivitySource,
      medium: classifyMedium({ hBondDonor: entry.hBondDonor, permittivity }),
      mediumSource: SOURCES.medium,
      cautions: entry.cautions,
    };
  });
}
