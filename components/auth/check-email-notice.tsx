import Link from "next/link";

/**
 * The page after a link was e-mailed (sign-in, sign-up): where it went, what following it does,
 * and the way back to correct the address.
 */
export function CheckEmailNotice({
  email,
  link,
  afterward,
  back,
}: {
  /** The address the link went to, as the form sent it (absent when the page is opened directly). */
  email?: string;
  /** What was sent, e.g. "a sign-in link". */
  link: string;
  /** What following the link does and how long it lasts. */
  afterward: string;
  back: { href: string; label: string };
}) {
  return (
    <>
      <header className="space-y-2">
        <h1 className="text-2xl font-semibold">Check your e-mail</h1>
        <p className="text-sm text-ink-soft">
          We sent {link} to {email ? <strong className="text-ink">{email}</strong> : "your address"}
          . {afterward}
        </p>
      </header>
      <Link
        href={back.href}
        className="text-sm font-medium text-indigo underline-offset-2 hover:underline"
      >
        {back.label}
      </Link>
    </>
  );
}
