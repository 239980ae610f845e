/**
 * The Solvatlas data model (SQLite through Drizzle).
 *
 * Conventions: snake_case columns; times are integer milliseconds since the epoch (`timestamp_ms`),
 * except `sessions.expires_at`, which lucia stores in seconds; colour coordinates are `real` and never
 * rounded in storage; every colour row names its illuminant (reference white) and observer.
 */
import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex, type AnySQLiteColumn } from "drizzle-orm/sqlite-core";
import type { PhotoExif } from "../lib/color/exif";

export const ROLES = ["admin", "chemist", "formulator"] as const;
export type Role = (typeof ROLES)[number];

export const MEDIA = ["protic", "dipolar-aprotic", "nonpolar"] as const;
export type Medium = (typeof MEDIA)[number];

export const ACID_BASE = ["acid", "neutral", "base"] as const;
export type AcidBase = (typeof ACID_BASE)[number];

export const REVIEW_STATES = ["pending", "accepted", "rejected"] as const;
export type ReviewState = (typeof REVIEW_STATES)[number];

export const ILLUMINANTS = ["D65", "D50", "A"] as const;
export type IlluminantName = (typeof ILLUMINANTS)[number];

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

// ---------------------------------------------------------------- people and access

export const users = sqliteTable("users", {
  id: text("id").primaryKey(),
  email: text("email").notNull().unique(),
  name: text("name").notNull(),
  role: text("role", { enum: ROLES }).notNull(),
  /** scrypt hash (`scrypt$N$r$p$salt$hash`); null until an invited person sets a password. */
  passwordHash: text("password_hash"),
  deactivatedAt: integer("deactivated_at", { mode: "timestamp_ms" }),
  createdAt: createdAt(),
});
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;

export const sessions = sqliteTable(
  "sessions",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    /** Unix seconds (lucia's SQLite adapter). */
    expiresAt: integer("expires_at").notNull(),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);
export type Session = typeof sessions.$inferSelect;

export const invitations = sqliteTable(
  "invitations",
  {
    id: text("id").primaryKey(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    role: text("role", { enum: ROLES }).notNull(),
    /** sha256 of the secret in the link; the secret itself is never stored. */
    tokenHash: text("token_hash").notNull().unique(),
    invitedBy: text("invited_by")
      .notNull()
      .references(() => users.id),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    usedAt: integer("used_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("invitations_email_idx").on(t.email)],
);
export type Invitation = typeof invitations.$inferSelect;

export const passwordResets = sqliteTable("password_resets", {
  id: text("id").primaryKey(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  tokenHash: text("token_hash").notNull().unique(),
  expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
  usedAt: integer("used_at", { mode: "timestamp_ms" }),
  createdAt: createdAt(),
});
export type PasswordReset = typeof passwordResets.$inferSelect;

export const apiTokens = sqliteTable(
  "api_tokens",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** First characters of the token, shown in lists so a person can tell tokens apart. */
    prefix: text("prefix").notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    lastUsedAt: integer("last_used_at", { mode: "timestamp_ms" }),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);
export type ApiToken = typeof apiTokens.$inferSelect;

/** One row per sign-in attempt; throttling counts recent failures per e-mail and per address. */
export const signInAttempts = sqliteTable(
  "sign_in_attempts",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    email: text("email").notNull(),
    ip: text("ip").notNull(),
    succeeded: integer("succeeded", { mode: "boolean" }).notNull(),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("sign_in_attempts_email_idx").on(t.email, t.at), index("sign_in_attempts_ip_idx").on(t.ip, t.at)],
);

/** Counted events for rate limits other than sign-ins (db/queries/rate.ts). */
export const rateEvents = sqliteTable(
  "rate_events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    /** What is counted, e.g. "reset-by-address", "reset-by-account", "share-by-user". */
    kind: text("kind").notNull(),
    key: text("key").notNull(),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("rate_events_kind_key_at_idx").on(t.kind, t.key, t.at)],
);

// ---------------------------------------------------------------- reference data

export const dyes = sqliteTable("dyes", {
  id: text("id").primaryKey(),
  code: text("code").notNull().unique(),
  name: text("name").notNull(),
  /** JSON array of strings. */
  synonyms: text("synonyms", { mode: "json" }).$type<string[]>().notNull().default(sql`'[]'`),
  casNumber: text("cas_number"),
  dyeClass: text("dye_class").notNull(),
  /** g/mol */
  molarMass: real("molar_mass"),
  notes: text("notes").notNull().default(""),
  hazards: text("hazards").notNull().default(""),
  createdBy: text("created_by").references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type Dye = typeof dyes.$inferSelect;
export type NewDye = typeof dyes.$inferInsert;

export const solvents = sqliteTable("solvents", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  synonyms: text("synonyms", { mode: "json" }).$type<string[]>().notNull().default(sql`'[]'`),
  /** Reichardt ET(30), kcal/mol. */
  et30: real("et30"),
  et30Source: text("et30_source"),
  /** ETN = (ET(30) − 30.7) / 32.4, derived; kept for sorting and queries. */
  etn: real("etn"),
  /** Kamlet–Taft H-bond donor acidity α. */
  ktAlpha: real("kt_alpha"),
  ktAlphaSource: text("kt_alpha_source"),
  /** Kamlet–Taft H-bond acceptor basicity β. */
  ktBeta: real("kt_beta"),
  ktBetaSource: text("kt_beta_source"),
  /** Kamlet–Taft dipolarity/polarizability π*. */
  ktPiStar: real("kt_pi_star"),
  ktPiStarSource: text("kt_pi_star_source"),
  /** Relative permittivity εr at about 25 °C. */
  permittivity: real("permittivity"),
  permittivitySource: text("permittivity_source"),
  medium: text("medium", { enum: MEDIA }).notNull(),
  mediumSource: text("medium_source").notNull(),
  /** Safety notes shown beside the solvent; never a substitute for the supplier's SDS. */
  cautions: text("cautions").notNull().default(""),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type Solvent = typeof solvents.$inferSelect;
export type NewSolvent = typeof solvents.$inferInsert;

export const conditions = sqliteTable(
  "conditions",
  {
    id: text("id").primaryKey(),
    solventId: text("solvent_id")
      .notNull()
      .references(() => solvents.id),
    acidBase: text("acid_base", { enum: ACID_BASE }).notNull(),
    ph: real("ph"),
    additive: text("additive").notNull().default(""),
    /** µmol/L of dye. */
    concentrationUmolL: real("concentration_umol_l"),
    pathLengthMm: real("path_length_mm"),
    temperatureC: real("temperature_c"),
    /** Binary blends: the second solvent and its mole fraction x₂ (0 < x₂ < 1); null for a neat solvent. */
    secondSolventId: text("second_solvent_id").references(() => solvents.id),
    secondSolventMoleFraction: real("second_solvent_mole_fraction"),
    /** Amount of the acid or base named in `additive`, mol/L in the vial. */
    additiveConcentrationMolL: real("additive_concentration_mol_l"),
    /** Ionic strength of the medium, mol/L (pKa values are apparent: medium and ionic strength go with them). */
    ionicStrengthMolL: real("ionic_strength_mol_l"),
    createdAt: createdAt(),
  },
  (t) => [index("conditions_solvent_idx").on(t.solventId)],
);
export type Condition = typeof conditions.$inferSelect;

// ---------------------------------------------------------------- lighting

export type TargetPatch = { name: string; lab: [number, number, number] };

export const calibrationTargets = sqliteTable("calibration_targets", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  description: text("description").notNull().default(""),
  /** Reference white the patch Lab values are relative to. */
  whitePoint: text("white_point", { enum: ILLUMINANTS }).notNull().default("D65"),
  patches: text("patches", { mode: "json" }).$type<TargetPatch[]>().notNull(),
  /** Patch layout on the card, read row by row from the top left, so a photo is sampled in one step. */
  gridRows: integer("grid_rows"),
  gridColumns: integer("grid_columns"),
  /** Instrument and date the patch values come from (e.g. the card maker's sheet, a spectrophotometer). */
  source: text("source").notNull().default(""),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
  createdAt: createdAt(),
});
export type CalibrationTarget = typeof calibrationTargets.$inferSelect;

/** "calibration": the lighting profile's engine calibration, then the 3×3 XYZ adaptation stored in `correction`. */
export const CORRECTION_KINDS = ["none", "white-scaling", "matrix-3x3", "root-polynomial", "calibration"] as const;

export const PROFILE_STATES = ["draft", "approved", "retired"] as const;
export type ProfileState = (typeof PROFILE_STATES)[number];
export type ProfileResidual = { patch: string; deltaE00: number; looDeltaE00?: number };
/** Four corners of the patch grid on a card photo, in photo pixels: top left, top right, bottom right, bottom left. */
export type GridCorners = [[number, number], [number, number], [number, number], [number, number]];
export type FitSample = {
  patch: string;
  rawLinearRgb: [number, number, number];
  spread: number;
  flags: string[];
  sd?: [number, number, number];
  pixels?: number;
  clippedFraction?: number;
};
export type CorrectionKind = (typeof CORRECTION_KINDS)[number];

export const lightingProfiles = sqliteTable("lighting_profiles", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  /** The CIE illuminant the light source stands for. */
  illuminant: text("illuminant", { enum: ILLUMINANTS }).notNull(),
  lightSource: text("light_source").notNull(),
  camera: text("camera").notNull(),
  targetId: text("target_id").references(() => calibrationTargets.id),
  correctionKind: text("correction_kind", { enum: CORRECTION_KINDS }).notNull(),
  /** Fitted correction: for matrix-3x3 a row-major 3×3 in linear RGB; for white-scaling 3 gains. */
  correction: text("correction", { mode: "json" }).$type<number[]>().notNull(),
  /** Residual ΔE00 per patch from the fit: on the training fit and leave-one-out (null for rows fitted before 0005). */
  residuals: text("residuals", { mode: "json" }).$type<ProfileResidual[]>(),
  validFrom: integer("valid_from", { mode: "timestamp_ms" }).notNull(),
  validUntil: integer("valid_until", { mode: "timestamp_ms" }),
  approvedBy: text("approved_by").references(() => users.id),
  approvedAt: integer("approved_at", { mode: "timestamp_ms" }),
  createdBy: text("created_by").references(() => users.id),
  createdAt: createdAt(),
  /** draft → approved → retired; only approved profiles inside their validity window are offered on the bench. */
  state: text("state", { enum: PROFILE_STATES }).notNull().default("draft"),
  colourTemperatureK: real("colour_temperature_k"),
  /** The camera's fixed settings as the admin wrote them (exposure, ISO, white balance, HDR off …). */
  cameraSettings: text("camera_settings").notNull().default(""),
  /** How the correction was chosen: white | matrix-3x3 | root-polynomial-2 | auto (by leave-one-out ΔE00). */
  method: text("method"),
  notes: text("notes").notNull().default(""),
  /** The fitted calibration as serialised by the colour engine (tone curves + correction, white point). */
  calibration: text("calibration", { mode: "json" }).$type<Record<string, unknown>>(),
  /** Leave-one-out ΔE00 over the card's patches: mean and maximum (the figures approval is judged by). */
  looMeanDeltaE00: real("loo_mean_delta_e00"),
  looMaxDeltaE00: real("loo_max_delta_e00"),
  /** The card photo the fit came from, and the grid's four corners on it (pixels, TL, TR, BR, BL). */
  fitPhotoId: text("fit_photo_id").references((): AnySQLiteColumn => photos.id),
  fitGrid: text("fit_grid", { mode: "json" }).$type<GridCorners>(),
  /** Sampled linear RGB per patch from the fit photo (kept so a fit can be re-run or re-derived). */
  fitSamples: text("fit_samples", { mode: "json" }).$type<FitSample[]>(),
  retiredBy: text("retired_by").references(() => users.id),
  retiredAt: integer("retired_at", { mode: "timestamp_ms" }),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type LightingProfile = typeof lightingProfiles.$inferSelect;

// ---------------------------------------------------------------- check standards and drift

/**
 * A check standard: a sealed dye solution or tile whose CIELAB was measured on a spectrophotometer.
 * When it appears in a bench photo, its ΔE00 to the known value is the lab's real accuracy.
 */
export const checkStandards = sqliteTable("check_standards", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  kind: text("kind", { enum: ["vial", "tile"] }).notNull().default("vial"),
  l: real("l").notNull(),
  a: real("a").notNull(),
  b: real("b").notNull(),
  whitePoint: text("white_point", { enum: ILLUMINANTS }).notNull().default("D65"),
  /** Instrument (and date) the known Lab was measured with. */
  sourceInstrument: text("source_instrument").notNull(),
  notes: text("notes").notNull().default(""),
  createdBy: text("created_by").references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
  /** A retired standard is no longer offered on the bench; its readings stay in the profiles' check histories. */
  retiredAt: integer("retired_at", { mode: "timestamp_ms" }),
  retiredBy: text("retired_by").references(() => users.id),
});
export type CheckStandard = typeof checkStandards.$inferSelect;

export const checkReadings = sqliteTable(
  "check_readings",
  {
    id: text("id").primaryKey(),
    standardId: text("standard_id")
      .notNull()
      .references(() => checkStandards.id),
    profileId: text("profile_id").references(() => lightingProfiles.id),
    photoId: text("photo_id").references(() => photos.id),
    /** Measured Lab, under the standard's white point. */
    l: real("l").notNull(),
    a: real("a").notNull(),
    b: real("b").notNull(),
    deltaE00: real("delta_e00").notNull(),
    createdBy: text("created_by").references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index("check_readings_profile_idx").on(t.profileId, t.createdAt)],
);
export type CheckReading = typeof checkReadings.$inferSelect;

/** A reference of known colour in a bench photo, seen through the profile, against what the profile expects. */
export const driftReadings = sqliteTable(
  "drift_readings",
  {
    id: text("id").primaryKey(),
    profileId: text("profile_id")
      .notNull()
      .references(() => lightingProfiles.id),
    photoId: text("photo_id").references(() => photos.id),
    label: text("label").notNull().default(""),
    deltaE00: real("delta_e00").notNull(),
    thresholdDeltaE00: real("threshold_delta_e00").notNull(),
    flagged: integer("flagged", { mode: "boolean" }).notNull().default(false),
    createdAt: createdAt(),
  },
  (t) => [index("drift_readings_profile_idx").on(t.profileId, t.createdAt)],
);
export type DriftReading = typeof driftReadings.$inferSelect;

// ---------------------------------------------------------------- bench records

/** EXIF facts kept with a photo (see lib/color/exif.ts). */
export type ExifSummary = PhotoExif;

export const photos = sqliteTable(
  "photos",
  {
    id: text("id").primaryKey(),
    /** Key of the original file in the photo store (lib/storage), content-addressed by sha256. */
    storageKey: text("storage_key").notNull(),
    sha256: text("sha256").notNull().unique(),
    /** Derived copies (EXIF orientation applied, 8-bit sRGB JPEG); null until made (demo seed photos). */
    thumbKey: text("thumb_key"),
    displayKey: text("display_key"),
    /** Bits per channel of the original (8 or 16). */
    bitDepth: integer("bit_depth").notNull().default(8),
    /** libvips interpretation of the original (srgb, rgb16, …). */
    colourSpace: text("colour_space").notNull().default("srgb"),
    byteSize: integer("byte_size").notNull(),
    mimeType: text("mime_type").notNull(),
    width: integer("width").notNull(),
    height: integer("height").notNull(),
    exif: text("exif", { mode: "json" }).$type<ExifSummary>().notNull().default(sql`'{}'`),
    originalName: text("original_name").notNull().default(""),
    lightingProfileId: text("lighting_profile_id").references(() => lightingProfiles.id),
    uploadedBy: text("uploaded_by")
      .notNull()
      .references(() => users.id),
    takenAt: integer("taken_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("photos_profile_idx").on(t.lightingProfileId)],
);
export type Photo = typeof photos.$inferSelect;

export type RegionShape = "rect" | "ellipse";
export type Region = { shape: RegionShape; x: number; y: number; w: number; h: number };
/** A reference patch of known colour marked in the same photo, as it was used for a measurement. */
export type ReferenceUsed = { region: Region; lab: [number, number, number]; rawLinearRgb: [number, number, number]; label?: string };

export const measurements = sqliteTable(
  "measurements",
  {
    id: text("id").primaryKey(),
    photoId: text("photo_id").references(() => photos.id),
    region: text("region", { mode: "json" }).$type<Region>(),
    dyeId: text("dye_id")
      .notNull()
      .references(() => dyes.id),
    conditionId: text("condition_id")
      .notNull()
      .references(() => conditions.id),
    lightingProfileId: text("lighting_profile_id").references(() => lightingProfiles.id),
    /**
     * The correction actually applied to the raw linear RGB (the profile's, combined with the in-photo
     * reference scaling when one was marked), so every colour can be re-derived from raw_r/g/b.
     */
    correctionKind: text("correction_kind", { enum: CORRECTION_KINDS }),
    correction: text("correction", { mode: "json" }).$type<number[]>(),
    referencePatches: text("reference_patches", { mode: "json" }).$type<ReferenceUsed[]>(),
    /** Robust mean of linear RGB (sRGB transfer undone, before any correction), 0–1. */
    rawR: real("raw_r").notNull(),
    rawG: real("raw_g").notNull(),
    rawB: real("raw_b").notNull(),
    /** Corrected tristimulus values, Y of the reference white = 100. */
    x: real("x").notNull(),
    y: real("y").notNull(),
    z: real("z").notNull(),
    l: real("l").notNull(),
    a: real("a").notNull(),
    b: real("b").notNull(),
    illuminant: text("illuminant", { enum: ILLUMINANTS }).notNull().default("D65"),
    observer: text("observer").notNull().default("CIE 1931 2°"),
    pixelCount: integer("pixel_count").notNull(),
    rejectedCount: integer("rejected_count").notNull(),
    /** Spread of the region (ΔE00-like uniformity figure); lower is more uniform. */
    spread: real("spread").notNull(),
    /**
     * Standard uncertainties of L*, a*, b* (JCGM 100 practice: pixel noise with an effective pixel count,
     * reference patch noise, the profile's leave-one-out residual), and the combined figure shown as
     * "± ΔE00". Null for rows made before uncertainties existed.
     */
    uL: real("u_l"),
    uA: real("u_a"),
    uB: real("u_b"),
    uDeltaE00: real("u_delta_e00"),
    flags: text("flags", { mode: "json" }).$type<string[]>().notNull().default(sql`'[]'`),
    /** The instrument of a colour measured without a photo (write API, imports); null for photos. */
    instrument: text("instrument"),
    flagReason: text("flag_reason"),
    reviewState: text("review_state", { enum: REVIEW_STATES }).notNull().default("pending"),
    reviewedBy: text("reviewed_by").references(() => users.id),
    reviewedAt: integer("reviewed_at", { mode: "timestamp_ms" }),
    reviewNote: text("review_note"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [
    index("measurements_dye_idx").on(t.dyeId),
    index("measurements_condition_idx").on(t.conditionId),
    index("measurements_photo_idx").on(t.photoId),
    index("measurements_review_idx").on(t.reviewState),
  ],
);
export type Measurement = typeof measurements.$inferSelect;
export type NewMeasurement = typeof measurements.$inferInsert;

/** A saved rack layout: region positions as fractions of the photo's width and height, reapplied to new photos. */
export type TemplateRegion = { shape: RegionShape; x: number; y: number; w: number; h: number; role: "vial" | "reference" | "check"; label: string };

export const rackTemplates = sqliteTable("rack_templates", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  regions: text("regions", { mode: "json" }).$type<TemplateRegion[]>().notNull(),
  createdBy: text("created_by")
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type RackTemplate = typeof rackTemplates.$inferSelect;

/**
 * One vial's place in a saved solvent panel: the solvent and every condition field the bench records.
 * Numbers in the units of `conditions` (pH, mol/L, °C, mm, mole fraction).
 */
export type PanelEntry = {
  solventId: string;
  acidBase: AcidBase;
  ph: number | null;
  /** Dye concentration, µmol/L (absent in panels saved before it was recorded). */
  concentrationUmolL?: number | null;
  additive: string;
  additiveConcentrationMolL: number | null;
  temperatureC: number | null;
  pathLengthMm: number | null;
  secondSolventId: string | null;
  secondSolventMoleFraction: number | null;
};

/** A saved solvent panel, applied to a rack's vials from left to right (migration 0010). */
export const solventPanels = sqliteTable("solvent_panels", {
  id: text("id").primaryKey(),
  name: text("name").notNull().unique(),
  entries: text("entries", { mode: "json" }).$type<PanelEntry[]>().notNull(),
  createdBy: text("created_by")
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type SolventPanel = typeof solventPanels.$inferSelect;

export const spectra = sqliteTable(
  "spectra",
  {
    id: text("id").primaryKey(),
    dyeId: text("dye_id")
      .notNull()
      .references(() => dyes.id),
    conditionId: text("condition_id")
      .notNull()
      .references(() => conditions.id),
    /** [[wavelength_nm, decadic absorbance], …] as measured. */
    points: text("points", { mode: "json" }).$type<[number, number][]>().notNull(),
    lambdaMaxNm: real("lambda_max_nm"),
    concentrationUmolL: real("concentration_umol_l"),
    pathLengthMm: real("path_length_mm"),
    instrument: text("instrument").notNull().default(""),
    /** The uploaded file's name; empty for JSON points and the demo (migration 0012). */
    originalName: text("original_name").notNull().default(""),
    /** Unit the wavelengths were sent in ("nm", "µm", "cm⁻¹"); `points` are always nm (migration 0012). */
    wavelengthUnit: text("wavelength_unit").notNull().default("nm"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index("spectra_dye_idx").on(t.dyeId), index("spectra_condition_idx").on(t.conditionId)],
);
export type Spectrum = typeof spectra.$inferSelect;

// ---------------------------------------------------------------- solvent models

/**
 * A dye's fitted solvent model (lib/models/dye-model.ts), derived from its accepted colours and the solvent
 * table. Recomputed lazily: `cache_key` fingerprints the inputs, and a stale row is replaced on next read.
 */
export const dyeModels = sqliteTable("dye_models", {
  dyeId: text("dye_id")
    .primaryKey()
    .references(() => dyes.id),
  cacheKey: text("cache_key").notNull(),
  version: integer("version").notNull(),
  /** The whole result object (fits, band points, leave-one-out figures) as JSON. */
  result: text("result", { mode: "json" }).notNull(),
  computedAt: integer("computed_at", { mode: "timestamp_ms" }).notNull(),
});
export type DyeModelRow = typeof dyeModels.$inferSelect;

/** Predicted colours of a dye in solvents it was not measured in: never measurements, always with ± ΔE00. */
export const dyePredictions = sqliteTable(
  "dye_predictions",
  {
    id: text("id").primaryKey(),
    dyeId: text("dye_id")
      .notNull()
      .references(() => dyes.id),
    solventId: text("solvent_id")
      .notNull()
      .references(() => solvents.id),
    l: real("l").notNull(),
    a: real("a").notNull(),
    b: real("b").notNull(),
    illuminant: text("illuminant", { enum: ILLUMINANTS }).notNull().default("D65"),
    observer: text("observer").notNull().default("CIE 1931 2°"),
    uncertaintyDeltaE00: real("uncertainty_delta_e00").notNull(),
    extrapolated: integer("extrapolated", { mode: "boolean" }).notNull(),
    /** "band" (scale fit on the apparent band position) or "cielab" (direct fit of L*, a*, b*). */
    route: text("route").notNull(),
    model: text("model").notNull(),
    wavenumberCm1: real("wavenumber_cm1"),
    wavenumberHalfWidthCm1: real("wavenumber_half_width_cm1"),
    cacheKey: text("cache_key").notNull(),
  },
  (t) => [index("dye_predictions_dye_idx").on(t.dyeId)],
);
export type DyePredictionRow = typeof dyePredictions.$inferSelect;

// ---------------------------------------------------------------- acid–base (migration 0011)

/**
 * A pH series grouped by a chemist: vials (measurements) of one dye in one medium, each with its pH.
 * The medium is the solvent, or a binary blend (second solvent and its mole fraction x₂), at the stated
 * ionic strength; a pKa fitted from it is apparent for that medium.
 */
export const phSeries = sqliteTable(
  "ph_series",
  {
    id: text("id").primaryKey(),
    dyeId: text("dye_id")
      .notNull()
      .references(() => dyes.id),
    name: text("name").notNull(),
    solventId: text("solvent_id")
      .notNull()
      .references(() => solvents.id),
    secondSolventId: text("second_solvent_id").references(() => solvents.id),
    secondSolventMoleFraction: real("second_solvent_mole_fraction"),
    /** mol/L; null when not recorded. */
    ionicStrengthMolL: real("ionic_strength_mol_l"),
    notes: text("notes").notNull().default(""),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("ph_series_dye_idx").on(t.dyeId), uniqueIndex("ph_series_dye_name_unique").on(t.dyeId, t.name)],
);
export type PhSeriesRow = typeof phSeries.$inferSelect;

/** One vial of a pH series: a measurement and the pH the chemist recorded for it. */
export const phSeriesVials = sqliteTable(
  "ph_series_vials",
  {
    seriesId: text("series_id")
      .notNull()
      .references(() => phSeries.id, { onDelete: "cascade" }),
    measurementId: text("measurement_id")
      .notNull()
      .references(() => measurements.id, { onDelete: "cascade" }),
    ph: real("ph").notNull(),
  },
  (t) => [primaryKey({ columns: [t.seriesId, t.measurementId] }), index("ph_series_vials_measurement_idx").on(t.measurementId)],
);
export type PhSeriesVialRow = typeof phSeriesVials.$inferSelect;

/**
 * The stored pKa fit of a series (lib/color/pka.ts, result JSON). `cache_key` fingerprints the accepted
 * vials (ids, pH, CIELAB); a row whose key no longer matches is recomputed on the next read.
 */
export const phSeriesFits = sqliteTable("ph_series_fits", {
  seriesId: text("series_id")
    .primaryKey()
    .references(() => phSeries.id, { onDelete: "cascade" }),
  cacheKey: text("cache_key").notNull(),
  version: integer("version").notNull(),
  result: text("result", { mode: "json" }).notNull(),
  computedAt: integer("computed_at", { mode: "timestamp_ms" }).notNull(),
});
export type PhSeriesFitRow = typeof phSeriesFits.$inferSelect;

// ---------------------------------------------------------------- formulator work

export const shortlists = sqliteTable("shortlists", {
  id: text("id").primaryKey(),
  ownerId: text("owner_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  name: text("name").notNull(),
  notes: text("notes").notNull().default(""),
  createdAt: createdAt(),
  updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
});
export type Shortlist = typeof shortlists.$inferSelect;

export const shortlistItems = sqliteTable(
  "shortlist_items",
  {
    id: text("id").primaryKey(),
    shortlistId: text("shortlist_id")
      .notNull()
      .references(() => shortlists.id, { onDelete: "cascade" }),
    dyeId: text("dye_id")
      .notNull()
      .references(() => dyes.id),
    note: text("note").notNull().default(""),
    position: integer("position").notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("shortlist_items_unique").on(t.shortlistId, t.dyeId)],
);
export type ShortlistItem = typeof shortlistItems.$inferSelect;

// ---------------------------------------------------------------- audit

export const auditLog = sqliteTable(
  "audit_log",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
    /** Null for the system (seed, migrations, CLI without a user). */
    actorId: text("actor_id").references(() => users.id),
    action: text("action").notNull(),
    entity: text("entity").notNull(),
    entityId: text("entity_id"),
    before: text("before", { mode: "json" }),
    after: text("after", { mode: "json" }),
  },
  (t) => [index("audit_entity_idx").on(t.entity, t.entityId), index("audit_at_idx").on(t.at)],
);
export type AuditEntry = typeof auditLog.$inferSelect;

// ---------------------------------------------------------------- change counters

/**
 * One counter per cached read model ("dyes": the dye list with measurement counts, migration 0009;
 * "search_means": the search's replicate means, migration 0013), bumped by SQL triggers in every
 * transaction that changes what the model reads.
 */
export const changeCounters = sqliteTable("change_counters", {
  name: text("name").primaryKey(),
  n: integer("n").notNull().default(0),
});

/**
 * One row per change of an accepted measurement that the search's replicate means read (migration 0013),
 * numbered with the 'search_means' counter's new value: the (dye, condition) groups before and after.
 * Written by SQL triggers only; pruned 65,536 rows behind.
 */
export const searchMeanChanges = sqliteTable("search_mean_changes", {
  seq: integer("seq").primaryKey(),
  oldDyeId: text("old_dye_id"),
  oldConditionId: text("old_condition_id"),
  newDyeId: text("new_dye_id"),
  newConditionId: text("new_condition_id"),
});
