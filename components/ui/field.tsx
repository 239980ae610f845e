import type { ComponentProps } from "react";

const INPUT =
  "min-h-11 w-full rounded-md border border-field bg-white px-3 text-base text-ink placeholder:text-ink-soft aria-[invalid=true]:border-2 aria-[invalid=true]:border-bad";

export function Field({ label, name, error, hint, children }: { label: string; name: string; error?: string[]; hint?: string; children?: React.ReactNode }) {
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      {hint && !error && <p className="text-xs text-ink-soft">{hint}</p>}
      {error && (
        <p id={`${name}-error`} className="text-sm font-medium text-bad">
          <span aria-hidden>× </span>
          {error.join(" ")}
        </p>
      )}
    </div>
  );
}

export function TextInput({ error, ...props }: ComponentProps<"input"> & { error?: string[] }) {
  return <input id={props.name} aria-invalid={error ? true : undefined} aria-describedby={error ? `${props.name}-error` : undefined} className={INPUT} {...props} />;
}

export function Select({ error, children, ...props }: ComponentProps<"select"> & { error?: string[] }) {
  return (
    <select id={props.name} aria-invalid={error ? true : undefined} className={INPUT} {...props}>
      {children}
    </select>
  );
}

export function TextArea({ error, ...props }: ComponentProps<"textarea"> & { error?: string[] }) {
  return <textarea id={props.name} aria-invalid={error ? true : undefined} className={`${INPUT} min-h-24 py-2`} {...props} />;
}
