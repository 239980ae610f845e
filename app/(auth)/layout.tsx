import { Mark } from "@/components/shell/mark";

export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <div className="flex min-h-dvh flex-col items-center justify-center px-4 py-10">
      <div className="w-full max-w-md">
        <div className="mb-5 flex items-center gap-3 border-b-2 border-ink pb-4">
          <Mark className="h-10 w-14" />
          <div>
            <p className="text-2xl font-bold">Solvatlas</p>
            <p className="text-sm text-ink-soft">Calibrated dye colour across solvents and pH</p>
          </div>
        </div>
        <div className="border border-line bg-white p-6">{children}</div>
      </div>
    </div>
  );
}
