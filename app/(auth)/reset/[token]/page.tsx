import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { NewPasswordForm } from "@/components/auth/auth-forms";
import { Notice } from "@/components/ui/card";
import { openPasswordReset } from "@/lib/auth/service";

export const metadata: Metadata = { title: "Choose a new password" };

export default async function ResetPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const reset = openPasswordReset(db(), token);
  return (
    <div className="space-y-5">
      <h1 className="text-xl font-semibold">Choose a new password</h1>
      {reset ? (
        <NewPasswordForm token={token} mode="reset" />
      ) : (
        <Notice tone="error" title="This link no longer works">
          Reset links work once and for one hour. <Link href="/forgot-password" className="underline">Ask for a new one</Link>.
        </Notice>
      )}
    </div>
  );
}
