/** The medium-class select shared by the colour, shift and pH-transition searches (values as the search API reads them). */
export function MediumSelect({ name, label = "Medium", defaultValue }: { name: string; label?: string; defaultValue: string | null }) {
  return (
    <label className="text-sm font-medium">
      {label}
      <select name={name} defaultValue={defaultValue ?? "any"} className="mt-1 min-h-11 w-full rounded-md border border-field bg-white px-3 font-normal">
        <option value="any">any</option>
        <option value="protic">protic</option>
        <option value="dipolar-aprotic">dipolar aprotic</option>
        <option value="nonpolar">non-polar</option>
        <option value="aprotic">aprotic (dipolar or non-polar)</option>
      </select>
    </label>
  );
}
