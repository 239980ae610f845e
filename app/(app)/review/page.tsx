import type { Metadata } from "next";
import { db } from "@/db/client";
import { reviewQueue } from "@/db/queries/bench";
import { ReviewButtons } from "@/components/review/review-buttons";
import { Badge, PageHeader } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { labToLch } from "@/lib/color/lab";

export const metadata: Metadata = { title: "Review" };

export default async function ReviewPage() {
  const { user, allowed } = await pageAccess(BENCH_ROLES);
  if (!allowed) return <Refused user={user} allowed={BENCH_ROLES} area="Review" />;
  const queue = reviewQueue(db(), { limit: 100 });
  return (
    <>
      <PageHeader title="Review" lead="New measurements wait here until a second person accepts them. Only accepted measurements count in search and in the solvent models. Nobody reviews their own." />
      {queue.length === 0 ? (
        <p className="rounded-xl border border-line bg-white p-6 text-sm">Nothing is waiting for review.</p>
      ) : (
        <ul className="space-y-2">
          {queue.map(({ m, dye, solvent, condition, author }) => {
            const lch = labToLch([m.l, m.a, m.b]);
            return (
              <li key={m.id} data-testid="review-item" className="flex flex-wrap items-center gap-4 rounded-xl border border-line bg-white p-3">
                <Swatch lab={[m.l, m.a, m.b]} size="lg" />
                <div className="min-w-56 flex-1 text-sm">
                  <p className="font-semibold">
                    {dye.code} · {dye.name}
                  </p>
                  <p className="text-ink-soft">
                    {solvent.name}, {condition.acidBase}
                    {condition.ph !== null ? `, pH ${condition.ph}` : ""} · L* {lch[0].toFixed(1)} C* {lch[1].toFixed(1)} h {lch[2].toFixed(0)}° · by {author}
                  </p>
                  {m.flags.length > 0 && (
                    <p className="mt-1 flex flex-wrap gap-1">
                      {m.flags.map((f) => (
                        <Badge key={f} tone="warn">
                          {f}
                        </Badge>
                      ))}
                      {m.flagReason && <span className="text-xs text-ink-soft">“{m.flagReason}”</span>}
                    </p>
                  )}
                </div>
                <ReviewButtons measurementId={m.id} own={m.createdBy === user.id} />
              </li>
            );
          })}
        </ul>
      )}
    </>
  );
}
