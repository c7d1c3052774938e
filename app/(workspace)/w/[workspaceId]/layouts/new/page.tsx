import type { Metadata } from "next";
import Link from "next/link";
import { PlanForm } from "@/components/layouts/plan-form";
import { buttonClasses } from "@/components/ui/button";
import { listDataFiles } from "@/db/queries/data-files";
import { guardPage } from "@/lib/auth/page-guard";
import { DEFAULT_PLANNED_SHARDS, GENERATOR_CHOICES } from "@/lib/layout-plans/plan-form-defaults";
import { startLayoutPlan } from "../actions";

export const metadata: Metadata = { title: "Plan layouts" };

/** The layout plan form: candidate splits of one registered dataset, scored side by side. */
export default async function NewLayoutPlanPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  await guardPage(workspaceId, "runAnalysis", `/w/${workspaceId}/layouts/new`);
  const datasets = (await listDataFiles(workspaceId, "dataset")).map((file) => ({
    id: file.id,
    name: file.name,
    columns: file.preview?.columns.map((column) => column.name) ?? [],
  }));
  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">Plan layouts</h1>
        <p className="max-w-prose text-ink-soft">
          Which split of these rows should you use? Partita generates candidate splits of one
          dataset into M shards, scores each with the full analysis under the same plan, and
          compares them. Export the one you choose, or analyse it into a reviewable report.
        </p>
      </header>
      {datasets.length === 0 ? (
        <div className="space-y-3 rounded-md border border-dashed border-ink/20 bg-white p-6">
          <p className="font-medium">No dataset in this workspace yet.</p>
          <p className="text-sm text-ink-soft">
            Upload a labelled dataset with the analysis form first; it then appears here.
          </p>
          <Link href={`/w/${workspaceId}/analyses/new`} className={buttonClasses("primary")}>
            Upload a dataset
          </Link>
        </div>
      ) : (
        <PlanForm
          workspaceId={workspaceId}
          datasets={datasets}
          choices={GENERATOR_CHOICES}
          defaultShards={DEFAULT_PLANNED_SHARDS}
          startLayoutPlan={startLayoutPlan.bind(null, workspaceId)}
        />
      )}
    </div>
  );
}
