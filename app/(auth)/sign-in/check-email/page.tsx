import type { Metadata } from "next";
import { CheckEmailNotice } from "@/components/auth/check-email-notice";

export const metadata: Metadata = { title: "Check your e-mail" };

export default async function CheckEmailPage({
  searchParams,
}: {
  searchParams: Promise<{ email?: string }>;
}) {
  const { email } = await searchParams;
  return (
    <CheckEmailNotice
      email={email}
      link="a sign-in link"
      afterward="It works once and expires in 24 hours."
      back={{ href: "/sign-in", label: "Back to sign-in" }}
    />
  );
}
