import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";

/**
 * The body of a "not found" page: what happened, the likely reasons, and links onwards. Shared by
 * the site-wide page and the one inside a workspace (which keeps the workspace's navigation).
 */
export function LostPage({
  links,
  reasons,
}: {
  links: { href: string; label: string }[];
  reasons: string[];
}) {
  return (
    <section className="max-w-prose space-y-4" aria-labelledby="lost-heading">
      <p className="text-sm font-medium tracking-wide text-cadmium uppercase">Not found</p>
      <h1 id="lost-heading" className="text-3xl font-semibold tracking-tight">
        There is nothing at this address
      </h1>
      <ul className="list-disc space-y-1 pl-5 text-ink-soft">
        {reasons.map((reason) => (
          <li key={reason}>{reason}</li>
        ))}
      </ul>
      <nav aria-label="Ways on" className="flex flex-wrap gap-2">
        {links.map((link, index) => (
          <Link
            key={link.href}
            href={link.href}
            className={buttonClasses(index === 0 ? "primary" : "quiet")}
          >
            {link.label}
          </Link>
        ))}
      </nav>
    </section>
  );
}
