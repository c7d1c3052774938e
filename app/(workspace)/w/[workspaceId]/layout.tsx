import Link from "next/link";
import type { ReactNode } from "react";
import { Wordmark } from "@/components/brand/wordmark";
import { QueryProvider } from "@/components/providers/query-provider";
import { NavLink } from "@/components/workspace/nav-link";
import { SignOutButton } from "@/components/workspace/sign-out-button";
import { WorkspaceSwitcher } from "@/components/workspace/workspace-switcher";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { env } from "@/lib/env";

export default async function WorkspaceLayout({
  children,
  params,
}: {
  children: ReactNode;
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { user, workspace } = await guardPage(workspaceId, "readWorkspace", `/w/${workspaceId}`);
  const workspaces = await listWorkspacesForUser(user.id);
  const base = `/w/${workspace.id}`;
  return (
    <div className="min-h-screen">
      <header className="no-print border-b border-ink/10 bg-white/70 backdrop-blur">
        {/* On a phone the navigation takes a full row of its own and wraps, so no page scrolls sideways. */}
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-4 gap-y-2 px-4 py-3 sm:px-6">
          <Link href={base} aria-label="Partita — workspace overview">
            <Wordmark />
          </Link>
          <WorkspaceSwitcher current={workspace} workspaces={workspaces} />
          <nav
            aria-label="Workspace"
            className="order-last flex w-full flex-wrap gap-1 text-sm lg:order-none lg:w-auto"
          >
            <NavLink href={base} exact>
              Overview
            </NavLink>
            <NavLink href={`${base}/reports`}>Reports</NavLink>
            {roleAllows(workspace.role, "uploadData") ? (
              <NavLink href={`${base}/analyses/new`}>New analysis</NavLink>
            ) : null}
            <NavLink href={`${base}/layouts`}>Plan layouts</NavLink>
            <NavLink href={`${base}/federated`}>Federated</NavLink>
            <NavLink href={`${base}/members`}>Members</NavLink>
            {roleAllows(workspace.role, "readAuditLog") ? (
              <NavLink href={`${base}/audit`}>Audit log</NavLink>
            ) : null}
            {roleAllows(workspace.role, "manageApiTokens") ? (
              <NavLink href={`${base}/tokens`}>API tokens</NavLink>
            ) : null}
            {env().DEV_MAIL_DIR ? (
              <Link
                className="rounded px-2 py-1 text-ink-soft hover:bg-paper-deep"
                href="/dev/inbox"
              >
                Dev inbox
              </Link>
            ) : null}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <Link
              href={`${base}/settings/notifications`}
              className="hidden text-sm text-ink-soft hover:underline sm:inline"
              data-testid="signed-in-as"
              title="Your e-mail notifications"
            >
              {user.email}
            </Link>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-6 sm:px-6 sm:py-10">
        <QueryProvider>{children}</QueryProvider>
      </main>
    </div>
  );
}
