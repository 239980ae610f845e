import { Notice } from "@/components/ui/card";

/** "Searching…" while a query runs. */
export function Searching({ active }: { active: boolean }) {
  if (!active) return null;
  return (
    <span className="text-sm text-ink-soft" role="status">
      Searching…
    </span>
  );
}

/** The server's message when a search could not run. */
export function SearchFailed({ error }: { error: Error | null }) {
  if (!error) return null;
  return (
    <div className="mt-4">
      <Notice tone="error" title="The search could not run">
        {error.message}
      </Notice>
    </div>
  );
}
