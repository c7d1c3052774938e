import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Check your e-mail" };

export default async function CheckEmailPage({
  searchParams,
}: {
  searchParams: Promise<{ email?: string }>;
}) {
  const { email } = await searchParams;
  return (
    <>
      <header className="space-y-2">
        <h1 className="text-2xl font-semibold">Check your e-mail</h1>
        <p className="text-sm text-ink-soft">
          We sent a sign-in link to{" "}
          {email ? <strong className="text-ink">{email}</strong> : "your address"}. It works once
          and expires in 24 hours.
        </p>
      </header>
      <Link
        href="/sign-in"
        className="text-sm font-medium text-indigo underline-offset-2 hover:underline"
      >
        Back to sign-in
      </Link>
    </>
  );
}
