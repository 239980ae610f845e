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

/**
 * The API names its parameters ("minShift must be …") because scripts call it; on the page the
 * message uses the label the person sees beside the field instead.
 */
export function inScreenWords(message: string, labels: Record<string, string>): string {
  const match = /^([A-Za-z]+)(: | )/.exec(message);
  if (!match || !(match[1] in labels)) return message;
  const label = labels[match[1]];
  return match[2] === ": " ? `${label}: ${message.slice(match[0].length)}` : `${label} ${message.slice(match[0].length)}`;
}

/** The server's message when a search could not run, in the words on the screen. */
export function SearchFailed({ error, labels = {} }: { error: Error | null; labels?: Record<string, string> }) {
  if (!error) return null;
  return (
    <div className="mt-4">
      <Notice tone="error" title="The search could not run">
        {inScreenWords(error.message, labels)} Your entries are kept above; change them and search again.
      </Notice>
    </div>
  );
}
