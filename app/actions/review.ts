"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { decideMeasurement } from "@/db/queries/review";
import { formAction } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";

const decisionSchema = z
  .object({
    measurementId: z.string().min(1).max(100),
    decision: z.enum(["accepted", "rejected"], { error: "Choose accept or reject." }),
    note: z.string().trim().max(2000).default(""),
  })
  .refine((v) => v.decision === "accepted" || v.note.length > 0, { error: "Say why you reject it, so the chemist can fix it.", path: ["note"] });

export const reviewAction = formAction({ access: BENCH_ROLES, schema: decisionSchema }, async (input, { user }) => {
  decideMeasurement(db(), { reviewer: user, ...input });
  revalidatePath("/review");
  return { ok: true, message: input.decision === "accepted" ? "Accepted." : "Rejected with your note." };
});
