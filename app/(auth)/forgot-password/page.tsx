import type { Metadata } from "next";
import Link from "next/link";
import { ResetRequestForm } from "@/components/auth/auth-forms";

export const metadata: Metadata = { title: "Reset password" };

export default function ForgotPasswordPage() {
  return (
    <div className="space-y-5">
      <h1 className="text-xl font-semibold">Reset your password</h1>
      <p className="text-sm text-ink-soft">We will e-mail you a link that lets you choose a new password. It works once, for one hour.</p>
      <ResetRequestForm />
      <Link href="/sign-in" className="block text-sm font-medium text-accent hover:underline">
        Back to sign in
      </Link>
    </div>
  );
}
