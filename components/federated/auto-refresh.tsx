"use client";

import { useRouter } from "next/navigation";
import { useEffect } from "react";

const REFRESH_MS = 2000;

/**
 * Re-renders the page from the server every two seconds while the analysis waits on its clients
 * or the coordinator, so the roster and the state move without a reload; stops once it ends.
 */
export function AutoRefresh({ active }: { active: boolean }) {
  const router = useRouter();
  useEffect(() => {
    if (!active) return;
    const timer = window.setInterval(() => router.refresh(), REFRESH_MS);
    return () => window.clearInterval(timer);
  }, [active, router]);
  return active ? (
    <p className="text-xs text-ink-soft" aria-live="polite">
      This page updates itself while the analysis waits.
    </p>
  ) : null;
}
