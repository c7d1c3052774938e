"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import type { ReactNode } from "react";

/** A header link that marks itself as the current page (for the eye and for screen readers). */
export function NavLink({
  href,
  exact = false,
  children,
}: {
  href: string;
  exact?: boolean;
  children: ReactNode;
}) {
  const pathname = usePathname();
  const current = exact ? pathname === href : pathname === href || pathname.startsWith(`${href}/`);
  return (
    <Link
      href={href}
      aria-current={current ? "page" : undefined}
      className="rounded px-2 py-1 whitespace-nowrap hover:bg-paper-deep aria-[current=page]:bg-paper-deep aria-[current=page]:font-medium"
    >
      {children}
    </Link>
  );
}
