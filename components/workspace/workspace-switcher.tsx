import Link from "next/link";
import type { WorkspaceSummary } from "@/db/queries/workspaces";
import { ROLE_LABELS } from "@/lib/auth/roles";

/** A disclosure list of the user's workspaces; plain links, so it works without JavaScript. */
export function WorkspaceSwitcher({
  current,
  workspaces,
}: {
  current: WorkspaceSummary;
  workspaces: WorkspaceSummary[];
}) {
  return (
    <details className="group relative">
      <summary className="flex cursor-pointer list-none items-center gap-2 rounded px-2 py-1 text-sm font-medium hover:bg-paper-deep">
        <span className="max-w-48 truncate">{current.name}</span>
        <span className="rounded bg-paper-deep px-1.5 py-0.5 text-xs text-ink-soft">
          {ROLE_LABELS[current.role]}
        </span>
        <span aria-hidden="true" className="text-ink-faint group-open:rotate-180">
          ▾
        </span>
      </summary>
      <ul className="absolute left-0 z-20 mt-1 w-72 max-w-[calc(100vw-2rem)] rounded-md border border-ink/10 bg-white p-1 shadow-lg">
        {workspaces.map((workspace) => (
          <li key={workspace.id}>
            <Link
              href={`/w/${workspace.id}`}
              aria-current={workspace.id === current.id ? "page" : undefined}
              className="flex items-center justify-between rounded px-3 py-2 text-sm hover:bg-paper aria-[current=page]:font-semibold"
            >
              <span className="truncate">{workspace.name}</span>
              <span className="text-xs text-ink-soft">{ROLE_LABELS[workspace.role]}</span>
            </Link>
          </li>
        ))}
      </ul>
    </details>
  );
}
