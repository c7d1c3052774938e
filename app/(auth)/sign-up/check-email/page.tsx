import type { Metadata } from "next";
import { CheckEmailNotice } from "@/components/auth/check-email-notice";

export const metadata: Metadata = { title: "Confirm your address" };

export default async function SignUpCheckEmailPage({
  searchParams,
}: {
  searchParams: Promise<{ email?: string }>;
}) {
  const { email } = await searchParams;
  return (
    <CheckEmailNotice
      email={email}
      link="a link"
      afterward="Follow it to confirm the address and create your account; until then nobody can sign in with it. The link works once and expires in 24 hours."
      back={{ href: "/sign-up", label: "Wrong address? Sign up again" }}
    />
  );
}
