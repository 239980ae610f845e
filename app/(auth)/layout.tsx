export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <div className="flex min-h-dvh flex-col items-center justify-center bg-ink px-4 py-10">
      <div className="w-full max-w-md">
        <div className="mb-6 flex items-center gap-3 text-white">
          <span aria-hidden className="spectral-strip inline-block h-10 w-4 rounded" />
          <div>
            <p className="text-2xl font-bold tracking-tight">Solvatlas</p>
            <p className="text-sm text-white/60">Calibrated dye colour across solvents and pH</p>
          </div>
        </div>
        <div className="rounded-2xl bg-white p-6 shadow-xl">{children}</div>
      </div>
    </div>
  );
}
