import Link from "next/link";
import type { ReactNode } from "react";
import { Wordmark } from "@/components/brand/wordmark";

export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <div className="grid min-h-screen lg:grid-cols-[1fr_1.1fr]">
      <aside className="hidden flex-col justify-between bg-ink p-12 text-paper lg:flex">
        <Link href="/" className="[&_span]:text-paper">
          <Wordmark />
        </Link>
        <div className="max-w-md space-y-4">
          <p className="text-2xl leading-snug font-medium">
            Before you spend the compute, find out how far your shards disagree.
          </p>
          <p className="text-sm text-paper/70">
            Partita measures label, size and feature skew and the gradient dissimilarity of a
            partitioned dataset, then tells you whether many local steps or large synchronized
            minibatches suit your training plan.
          </p>
        </div>
        <p className="text-xs text-paper/50">
          Advice rests on a convex proxy model and on rates that hide constants — a guide for
          planning, not a guarantee.
        </p>
      </aside>
      <main className="flex items-center justify-center p-6 sm:p-12">
        <div className="w-full max-w-sm space-y-6">
          <div className="lg:hidden">
            <Wordmark />
          </div>
          {children}
        </div>
      </main>
    </div>
  );
}
