import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/auth-forms";
import { Notice } from "@/components/ui/card";
import { currentUser } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string; reset?: string }> }) {
  if (await currentUser()) redirect("/");
  const { next, reset } = await searchParams;
  return (
    <div className="space-y-5">
      <h1 className="text-xl font-semibold">Sign in</h1>
      {reset && <Notice tone="ok">Your password was changed. Sign in with the new one.</Notice>}
      <SignInForm next={next} />
    </div>
  );
}
