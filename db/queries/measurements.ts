/**
 * Reading measurements for the table, the export and the public API: filters, sorting and paging all
 * done in SQL so the browser only ever holds one page.
 */
import { and, asc, desc, eq, gte, isNull, lt, sql, type SQL } from "drizzle-orm";
import type { Db } from "../connection";
import { conditions, dyes, lightingProfiles, measurements, solvents, users, type AcidBase, type Medium, type ReviewState } from "../schema";

export type MeasurementFilters = {
  dyeId?: string;
  solventId?: string;
  medium?: Medium;
  acidBase?: AcidBase;
  /** A profile id, or "none" for measurements made without one. */
  profileId?: string;
  /** Omitted means every state. */
  state?: ReviewState;
  /** Inclusive start and exclusive end, both as times. */
  from?: Date;
  to?: Date;
  authorId?: string;
  photoId?: string;
};

export const MEASUREMENT_SORTS = ["measuredAt", "dye", "solvent", "medium", "acidBase", "ph", "l", "c", "h", "state"] as const;
export type MeasurementSort = (typeof MEASUREMENT_SORTS)[number];

const chroma = sql<number>`sqrt(${measurements.a} * ${measurements.a} + ${measurements.b} * ${measurements.b})`;
// hab in degrees, 0–360 (CIE 015:2018 §8.2.1: hab = atan2(b*, a*)).
const hue = sql<number>`(degrees(atan2(${measurements.b}, ${measurements.a})) + 360) % 360`;

const SORT_COLUMNS: Record<MeasurementSort, SQL | typeof measurements.createdAt> = {
  measuredAt: sql`${measurements.createdAt}`,
  dye: sql`${dyes.code}`,
  solvent: sql`${solvents.name}`,
  medium: sql`${solvents.medium}`,
  acidBase: sql`${conditions.acidBase}`,
  ph: sql`${conditions.ph}`,
  l: sql`${measurements.l}`,
  c: chroma,
  h: hue,
  state: sql`${measurements.reviewState}`,
};

function where(f: MeasurementFilters): SQL | undefined {
  const parts: (SQL | undefined)[] = [
    f.dyeId ? eq(measurements.dyeId, f.dyeId) : undefined,
    f.solventId ? eq(conditions.solventId, f.solventId) : undefined,
    f.medium ? eq(solvents.medium, f.medium) : undefined,
    f.acidBase ? eq(conditions.acidBase, f.acidBase) : undefined,
    f.profileId === "none" ? isNull(measurements.lightingProfileId) : f.profileId ? eq(measurements.lightingProfileId, f.profileId) : undefined,
    f.state ? eq(measurements.reviewState, f.state) : undefined,
    f.from ? gte(measurements.createdAt, f.from) : undefined,
    f.to ? lt(measurements.createdAt, f.to) : undefined,
    f.authorId ? eq(measurements.createdBy, f.authorId) : undefined,
    f.photoId ? eq(measurements.photoId, f.photoId) : undefined,
  ];
  const used = parts.filter((p): p is SQL => !!p);
  return used.length ? and(...used) : undefined;
}

function base(db: Db) {
  return db
    .select({
      m: measurements,
      dye: { id: dyes.id, code: dyes.code, name: dyes.name },
      condition: conditions,
      solvent: {
        id: solvents.id,
        name: solvents.name,
        medium: solvents.medium,
        // Parameters travel with each colour in exports (ET(30) kcal/mol; the others dimensionless).
        et30: solvents.et30,
        etn: solvents.etn,
        ktAlpha: solvents.ktAlpha,
        ktBeta: solvents.ktBeta,
        ktPiStar: solvents.ktPiStar,
        permittivity: solvents.permittivity,
      },
      profile: { id: lightingProfiles.id, name: lightingProfiles.name },
      author: users.name,
      chroma,
      hue,
    })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .innerJoin(users, eq(measurements.createdBy, users.id))
    .leftJoin(lightingProfiles, eq(measurements.lightingProfileId, lightingProfiles.id));
}

export type MeasurementRow = ReturnType<typeof listAllMeasurements>[number];

/** One page of measurements plus the total matching the filters. */
export function listMeasurements(
  db: Db,
  { filters = {}, sort = "measuredAt", direction = "desc", page = 1, pageSize = 50 }: { filters?: MeasurementFilters; sort?: MeasurementSort; direction?: "asc" | "desc"; page?: number; pageSize?: number },
) {
  const order = direction === "asc" ? asc(SORT_COLUMNS[sort]) : desc(SORT_COLUMNS[sort]);
  const condition = where(filters);
  const rows = base(db)
    .where(condition)
    .orderBy(order, asc(measurements.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize)
    .all();
  const total =
    db
      .select({ n: sql<number>`count(*)` })
      .from(measurements)
      .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
      .innerJoin(solvents, eq(conditions.solventId, solvents.id))
      .where(condition)
      .get()?.n ?? 0;
  return { rows, total };
}

/** Every measurement matching the filters, for exports; ordered by dye, solvent, time. */
export function listAllMeasurements(db: Db, filters: MeasurementFilters = {}) {
  return base(db).where(where(filters)).orderBy(asc(dyes.code), asc(solvents.name), asc(measurements.createdAt), asc(measurements.id)).all();
}

/** The choices the filters offer: dyes and solvents that have measurements, every profile. */
export function measurementFilterChoices(db: Db) {
  const dyeList = db
    .selectDistinct({ id: dyes.id, code: dyes.code, name: dyes.name })
    .from(dyes)
    .innerJoin(measurements, eq(measurements.dyeId, dyes.id))
    .orderBy(dyes.code)
    .all();
  const solventList = db
    .selectDistinct({ id: solvents.id, name: solvents.name, medium: solvents.medium })
    .from(solvents)
    .innerJoin(conditions, eq(conditions.solventId, solvents.id))
    .innerJoin(measurements, eq(measurements.conditionId, conditions.id))
    .orderBy(solvents.name)
    .all();
  const profiles = db.select({ id: lightingProfiles.id, name: lightingProfiles.name }).from(lightingProfiles).orderBy(lightingProfiles.name).all();
  return { dyes: dyeList, solvents: solventList, profiles };
}
