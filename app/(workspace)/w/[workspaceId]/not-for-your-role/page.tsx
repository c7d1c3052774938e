import type { Metadata } from "next";
import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import { guardPage } from "@/lib/auth/page-guard";
import {
  CAPABILITIES,
  CAPABILITY_DESCRIPTIONS,
  describeHolders,
  ROLE_LABELS,
  type Capability,
} from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Not for your role" };

function isCapability(value: unknown): value is Capability {
  return typeof value === "string" && Object.hasOwn(CAPABILITIES, value);
}

/**
 * Where a member lands when a page needs a role they do not hold: it says which page, who may open
 * it and what to do, instead of silently sending them elsewhere. Only same-workspace paths are
 * offered back as links.
 */
export default async function NotForYourRolePage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(workspaceId, "readWorkspace", `/w/${workspaceId}`);
  const query = await searchParams;
  const need = isCapability(query.need) ? query.need : undefined;
  const base = `/w/${workspace.id}`;
  const page =
    typeof query.page === "string" && query.page.startsWith(`${base}/`) ? query.page : undefined;
  return (
    <section className="max-w-prose space-y-4" aria-labelledby="not-for-role-heading">
      <p className="text-sm font-medium tracking-wide text-cadmium uppercase">Not for your role</p>
      <h1 id="not-for-role-heading" className="text-3xl font-semibold tracking-tight">
        This page is not open to {ROLE_LABELS[workspace.role].toLowerCase()}s
      </h1>
      <p className="text-ink-soft">
        {page ? (
          <>
            You asked for <code className="break-all">{page}</code>.{" "}
          </>
        ) : null}
        {need
          ? `Only ${describeHolders(need)} may ${CAPABILITY_DESCRIPTIONS[need]} in “${workspace.name}”.`
          : `Your role in “${workspace.name}” does not include this page.`}{" "}
        If you need it, ask an owner of the workspace to change your role on the Members page.
      </p>
      <div className="flex flex-wrap gap-2">
        <Link href={base} className={buttonClasses("primary")}>
          Workspace overview
        </Link>
        <Link href={`${base}/reports`} className={buttonClasses("quiet")}>
          Reports
        </Link>
        <Link href={`${base}/members`} className={buttonClasses("quiet")}>
          Members
        </Link>
      </div>
    </section>
  );
}
