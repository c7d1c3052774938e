"use client";

import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";

/** TanStack Query for the workspace's client components (live progress, and whatever else polls). */
export function QueryProvider({ children }: { children: ReactNode }) {
  // One client per browser tab, created on first render, so caches never leak between requests.
  const [client] = useState(() => new QueryClient());
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
