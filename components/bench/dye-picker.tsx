"use client";

import { useId, useMemo, useState } from "react";

export type DyeOption = { id: string; code: string; name: string; synonyms: string[]; dyeClass: string };

/** A searchable dye picker: type part of a code, name or synonym, then pick with the arrow keys and Enter, or a click. */
export function DyePicker({ dyes, value, onChange, label, hideLabel = false }: { dyes: DyeOption[]; value: string; onChange: (id: string) => void; label: string; hideLabel?: boolean }) {
  const id = useId();
  const chosen = dyes.find((d) => d.id === value);
  const [text, setText] = useState("");
  const [open, setOpen] = useState(false);
  const [active, setActive] = useState(0);
  const matches = useMemo(() => {
    const q = text.trim().toLowerCase();
    const list = q
      ? dyes.filter((d) => d.code.toLowerCase().includes(q) || d.name.toLowerCase().includes(q) || d.dyeClass.toLowerCase().includes(q) || d.synonyms.some((s) => s.toLowerCase().includes(q)))
      : dyes;
    return list.slice(0, 8);
  }, [dyes, text]);

  const pick = (d: DyeOption) => {
    onChange(d.id);
    setText("");
    setOpen(false);
  };

  return (
    <div className="relative space-y-1">
      <label htmlFor={id} className={hideLabel ? "sr-only" : "block text-xs font-semibold text-ink-soft"}>
        {label}
      </label>
      <input
        id={id}
        role="combobox"
        aria-expanded={open}
        aria-controls={`${id}-list`}
        aria-autocomplete="list"
        aria-activedescendant={open && matches[active] ? `${id}-${matches[active].id}` : undefined}
        value={open ? text : chosen ? `${chosen.code} · ${chosen.name}` : text}
        placeholder="Type a code or name"
        onFocus={() => {
          setOpen(true);
          setText("");
          setActive(0);
        }}
        onBlur={() => setTimeout(() => setOpen(false), 120)}
        onChange={(e) => {
          setText(e.target.value);
          setOpen(true);
          setActive(0);
        }}
        onKeyDown={(e) => {
          if (e.key === "ArrowDown") {
            e.preventDefault();
            setActive((a) => Math.min(a + 1, matches.length - 1));
          } else if (e.key === "ArrowUp") {
            e.preventDefault();
            setActive((a) => Math.max(a - 1, 0));
          } else if (e.key === "Enter" && open && matches[active]) {
            e.preventDefault();
            pick(matches[active]);
          } else if (e.key === "Escape") setOpen(false);
        }}
        className="min-h-10 w-full rounded-md border border-line bg-white px-2 text-sm focus:border-accent focus:outline-none"
      />
      {open && (
        <ul id={`${id}-list`} role="listbox" aria-label={`${label}: matching dyes`} className="absolute z-20 mt-1 max-h-72 w-full min-w-[16rem] overflow-auto rounded-lg border border-line bg-white shadow-lg">
          {matches.length === 0 && (
            <li className="px-3 py-2 text-sm text-ink-soft">
              No dye matches “{text}”.{" "}
              <a
                href={`/catalogue/new?name=${encodeURIComponent(text.trim())}`}
                target="_blank"
                rel="noopener"
                onMouseDown={(e) => e.preventDefault()}
                className="font-semibold text-accent underline"
              >
                Add it to the catalogue
              </a>{" "}
              (opens in a new tab; come back and type its code).
            </li>
          )}
          {matches.map((d, i) => (
            <li
              key={d.id}
              id={`${id}-${d.id}`}
              role="option"
              aria-selected={i === active}
              onMouseDown={(e) => {
                e.preventDefault();
                pick(d);
              }}
              className={`cursor-pointer px-3 py-2.5 text-sm ${i === active ? "bg-accent-soft" : ""}`}
            >
              <span className="font-mono text-xs font-semibold">{d.code}</span> · {d.name} <span className="text-xs text-ink-soft">({d.dyeClass})</span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
