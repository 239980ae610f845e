"use client";

export default function AppError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div role="alert" className="mx-auto mt-10 max-w-xl border border-l-4 border-bad bg-white p-8">
      <h1 className="text-xl font-bold">This page could not be shown</h1>
      <p className="mt-2 text-ink-soft">Nothing you saved is lost. Try again; if it keeps failing, tell your admin{error.digest ? ` and quote ${error.digest}` : ""}.</p>
      <button onClick={reset} className="mt-5 min-h-11 rounded-md bg-ink px-4 font-semibold text-white">
        Try again
      </button>
    </div>
  );
}
