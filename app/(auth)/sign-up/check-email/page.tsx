import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Confirm your address" };

export default async function SignUpCheckEmailPage({
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
          We sent a link to {email ? <strong className="text-ink">{email}</strong> : "your address"}
          . Follow it to confirm the address and create your account; until then nobody can sign in
          with it. The link works once and expires in 24 hours.
        </p>
      </header>
      <Link
        href="/sign-up"
        className="text-sm font-medium text-indigo underline-offset-2 hover:underline"
      >
        Wrong address? Sign up again
      </Link>
    </>
  );
}
