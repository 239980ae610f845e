export default function Loading() {
  return (
    <div aria-busy="true" aria-live="polite" className="space-y-4">
      <div className="h-8 w-64 animate-pulse rounded bg-paper-deep" />
      <div className="h-40 animate-pulse rounded-xl bg-paper-deep" />
      <span className="sr-only">Loading…</span>
    </div>
  );
}
