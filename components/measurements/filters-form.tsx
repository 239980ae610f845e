import type { TableParams } from "@/app/api/measurements/filters";
import { ACID_BASE, MEDIA, REVIEW_STATES } from "@/db/schema";

type Choices = { dyes: { id: string; code: string; name: string }[]; solvents: { id: string; name: string; medium: string }[]; profiles: { id: string; name: string }[] };

const SELECT = "min-h-11 w-full rounded-lg border border-line bg-white px-2 text-sm";
const MEDIUM_LABEL: Record<string, string> = { protic: "protic", "dipolar-aprotic": "dipolar aprotic", nonpolar: "non-polar" };

/** A plain GET form: works without JavaScript, and every filter is in the URL (shareable, exportable). */
export function MeasurementFiltersForm({ choices, values }: { choices: Choices; values: TableParams }) {
  const field = (id: string, label: string, control: React.ReactNode) => (
    <div className="min-w-40 flex-1 space-y-1">
      <label htmlFor={id} className="block text-xs font-semibold text-ink-soft">
        {label}
      </label>
      {control}
    </div>
  );
  return (
    <form method="get" aria-label="Filter measurements" className="mb-4 flex flex-wrap items-end gap-3 rounded-xl border border-line bg-white p-4">
      {field(
        "f-dye",
        "Dye",
        <select id="f-dye" name="dyeId" defaultValue={values.dyeId ?? ""} className={SELECT}>
          <option value="">any dye</option>
          {choices.dyes.map((d) => (
            <option key={d.id} value={d.id}>
              {d.code} · {d.name}
            </option>
          ))}
        </select>,
      )}
      {field(
        "f-solvent",
        "Solvent",
        <select id="f-solvent" name="solventId" defaultValue={values.solventId ?? ""} className={SELECT}>
          <option value="">any solvent</option>
          {choices.solvents.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name} ({MEDIUM_LABEL[s.medium]})
            </option>
          ))}
        </select>,
      )}
      {field(
        "f-medium",
        "Medium",
        <select id="f-medium" name="medium" defaultValue={values.medium ?? ""} className={SELECT}>
          <option value="">any medium</option>
          {MEDIA.map((m) => (
            <option key={m} value={m}>
              {MEDIUM_LABEL[m]}
            </option>
          ))}
        </select>,
      )}
      {field(
        "f-acid",
        "Condition",
        <select id="f-acid" name="acidBase" defaultValue={values.acidBase ?? ""} className={SELECT}>
          <option value="">any condition</option>
          {ACID_BASE.map((m) => (
            <option key={m} value={m}>
              {m}
            </option>
          ))}
        </select>,
      )}
      {field(
        "f-profile",
        "Lighting profile",
        <select id="f-profile" name="profileId" defaultValue={values.profileId ?? ""} className={SELECT}>
          <option value="">any profile</option>
          <option value="none">none (uncorrected)</option>
          {choices.profiles.map((p) => (
            <option key={p.id} value={p.id}>
              {p.name}
            </option>
          ))}
        </select>,
      )}
      {field(
        "f-state",
        "Review state",
        <select id="f-state" name="state" defaultValue={values.state ?? ""} className={SELECT}>
          <option value="">any state</option>
          {REVIEW_STATES.map((m) => (
            <option key={m} value={m}>
              {m}
            </option>
          ))}
        </select>,
      )}
      {field("f-from", "From (UTC)", <input id="f-from" type="date" name="from" defaultValue={values.from ?? ""} className={SELECT} />)}
      {field("f-to", "To (UTC, inclusive)", <input id="f-to" type="date" name="to" defaultValue={values.to ?? ""} className={SELECT} />)}
      {field(
        "f-author",
        "Measured by",
        <select id="f-author" name="author" defaultValue={values.author ?? ""} className={SELECT}>
          <option value="">anyone</option>
          <option value="me">me</option>
        </select>,
      )}
      <input type="hidden" name="sort" value={values.sort} />
      <input type="hidden" name="dir" value={values.dir} />
      <input type="hidden" name="pageSize" value={values.pageSize} />
      <div className="flex gap-2">
        <button className="min-h-11 rounded-lg bg-accent px-4 text-sm font-semibold text-white">Apply filters</button>
        <a href="/measurements" className="inline-flex min-h-11 items-center rounded-lg border border-line px-4 text-sm font-semibold">
          Clear
        </a>
      </div>
    </form>
  );
}
