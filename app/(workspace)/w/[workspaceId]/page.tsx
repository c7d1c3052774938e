import type { Metadata } from "next";
import Link from "next/link";
import { LatestReports } from "@/components/reports/latest-reports";
import { buttonClasses } from "@/components/ui/button";
import { Cautions } from "@/components/workspace/cautions";
import { LabelMixSketch } from "@/components/workspace/label-mix-sketch";
import { listReports } from "@/db/queries/reports";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Overview" };

const LATEST_COUNT = 6;

const STEPS = [
  {
    title: "A labelled dataset",
    body: "A CSV file with a header row. One column holds the label (a class, or a number for regression); the others are features — numeric, or categorical with up to 32 levels. An id column is optional.",
  },
  {
    title: "A layout",
    body: "Which shard each row lives on: either a shard column in the dataset, or a separate partition map, a CSV with the header row_id,shard (row_id is the id column, or the 0-based row number).",
  },
  {
    title: "Your plan",
    body: "Participants per round, local steps, rounds and batch size. Partita measures label, size and feature skew and gradient dissimilarity, then compares local SGD with minibatch SGD for that plan.",
  },
];

export default async function WorkspaceOverviewPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(workspaceId, "readWorkspace", `/w/${workspaceId}`);
  const canUpload = roleAllows(workspace.role, "uploadData");
  const latest = await listReports(workspace.id, {}, LATEST_COUNT);
  if (latest.length > 0) {
    const base = `/w/${workspace.id}`;
    return (
      <div className="space-y-10">
        <section className="space-y-3">
          <p className="text-sm font-medium tracking-wide text-verdigris uppercase">
            Latest reports
          </p>
          <h1 className="text-3xl font-semibold tracking-tight">{workspace.name}</h1>
          <p className="max-w-prose text-ink-soft">
            Each report measures how different the shards of a partitioned dataset are and says
            whether local updates or large minibatches suit the split for the training plan given.
          </p>
        </section>
        <section aria-labelledby="latest-reports" className="space-y-4">
          <div className="flex flex-wrap items-center justify-between gap-3">
            <h2 id="latest-reports" className="text-lg font-semibold">
              Newest first
            </h2>
            <div className="flex gap-2">
              <Link href={`${base}/reports`} className={buttonClasses("quiet")}>
                All reports
              </Link>
              {canUpload ? (
                <>
                  <Link href={`${base}/layouts/new`} className={buttonClasses("quiet")}>
                    Plan layouts
                  </Link>
                  <Link href={`${base}/federated/new`} className={buttonClasses("quiet")}>
                    New federated analysis
                  </Link>
                  <Link href={`${base}/analyses/new`} className={buttonClasses("primary")}>
                    New analysis
                  </Link>
                </>
              ) : null}
            </div>
          </div>
          <LatestReports workspaceId={workspace.id} reports={latest} />
        </section>
        <Cautions sharing />
      </div>
    );
  }
  return (
    <div className="space-y-10">
      <section className="grid items-center gap-8 md:grid-cols-[1.4fr_1fr]">
        <div className="space-y-3">
          <p className="text-sm font-medium tracking-wide text-verdigris uppercase">
            No reports yet
          </p>
          <h1 className="text-3xl font-semibold tracking-tight">{workspace.name}</h1>
          <p className="max-w-prose text-ink-soft">
            Partita tells you, before you spend the compute, whether many local steps between rare
            averaging rounds or fewer, larger synchronized minibatches suit the way your data is
            split across machines or devices. It measures how far your shards disagree — in their
            labels, their sizes and, above all, their gradients at a reference model — and reads the
            answer off published convergence bounds for your own training plan.
          </p>
          <p className="text-sm text-ink-soft">
            {canUpload
              ? "To start a report you will need the three things below."
              : "As a reviewer you will find reports here once analysts publish them; you can comment on them and endorse a layout or return it for rework."}
          </p>
          {canUpload ? (
            <div className="flex flex-wrap gap-2">
              <Link href={`/w/${workspace.id}/analyses/new`} className={buttonClasses("primary")}>
                Start your first analysis
              </Link>
              <Link href={`/w/${workspace.id}/federated/new`} className={buttonClasses("quiet")}>
                New federated analysis
              </Link>
            </div>
          ) : null}
        </div>
        <figure className="rounded-lg border border-ink/10 bg-white p-4">
          <LabelMixSketch />
          <figcaption className="mt-2 text-xs text-ink-soft">
            What a report opens with: each shard&apos;s label mix beside the pooled mix.
          </figcaption>
        </figure>
      </section>
      <section aria-labelledby="what-to-bring">
        <h2 id="what-to-bring" className="mb-4 text-lg font-semibold">
          What to bring
        </h2>
        <ol className="grid gap-4 md:grid-cols-3">
          {STEPS.map((step, index) => (
            <li key={step.title} className="rounded-lg border border-ink/10 bg-white p-5">
              <span className="mb-2 inline-flex h-7 w-7 items-center justify-center rounded-full bg-indigo-soft text-sm font-semibold text-indigo">
                {index + 1}
              </span>
              <h3 className="font-semibold">{step.title}</h3>
              <p className="mt-1 text-sm text-ink-soft">{step.body}</p>
            </li>
          ))}
        </ol>
      </section>
      <Cautions sharing />
    </div>
  );
}
