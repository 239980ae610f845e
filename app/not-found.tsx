import Link from "next/link";

export default function NotFound() {
  return (
    <div className="mx-auto mt-16 max-w-xl border border-line bg-white p-8">
      <h1 className="text-xl font-bold">Nothing here</h1>
      <p className="mt-2 text-ink-soft">The page or record you asked for does not exist, or it was removed.</p>
      <Link href="/" className="mt-5 inline-flex min-h-11 items-center rounded-md bg-ink px-4 font-semibold text-white">
        Go to the overview
      </Link>
    </div>
  );
}
