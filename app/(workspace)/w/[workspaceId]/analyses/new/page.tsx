import type { Metadata } from "next";
import { AnalysisForm } from "@/components/analyses/analysis-form";
import { EMPTY_FORM, formValuesFrom } from "@/components/analyses/analysis-form-schema";
import { Notice } from "@/components/ui/notice";
import {
  findAnalysisForForm,
  findLayoutCandidateForForm,
  findReportAnalysisForForm,
} from "@/db/queries/analysis-prefill";
import { findDataFile, listDataFiles, type DataFileSummary } from "@/db/queries/data-files";
import { guardPage } from "@/lib/auth/page-guard";
import { env } from "@/lib/env";
import { estimateSimulation, startAnalysis } from "../actions";
import { deleteDataFile, previewDatasetAs, registerDataFile } from "./actions";

export const metadata: Metadata = { title: "New analysis" };

/** The file behind a prefilled choice stays pickable even when it is not among the newest. */
async function withFile(
  workspaceId: string,
  files: DataFileSummary[],
  fileId: string | null | undefined,
): Promise<DataFileSummary[]> {
  if (!fileId || files.some((file) => file.id === fileId)) return files;
  const found = await findDataFile(workspaceId, fileId);
  if (!found) return files;
  const { id, kind, name, sizeBytes, createdAt, preview, sha256, analysisCount } = found;
  return [...files, { id, kind, name, sizeBytes, createdAt, preview, sha256, analysisCount }];
}

export default async function NewAnalysisPage({
  params,
  searchParams,
}: {
  params: Promise<{ workspaceId: string }>;
  searchParams: Promise<{
    from?: string | string[];
    revise?: string | string[];
    layoutPlan?: string | string[];
    candidate?: string | string[];
  }>;
}) {
  const { workspaceId } = await params;
  const query = await searchParams;
  const from = typeof query.from === "string" ? query.from : undefined;
  const revise = typeof query.revise === "string" ? query.revise : undefined;
  // "Analyse this layout" on a plan's comparison: the candidate's registered map.
  const layoutPlan = typeof query.layoutPlan === "string" ? query.layoutPlan : undefined;
  const candidate = typeof query.candidate === "string" ? Number(query.candidate) : NaN;
  const fromLayout = layoutPlan !== undefined && Number.isInteger(candidate);
  const returnTo = `/w/${workspaceId}/analyses/new${
    revise
      ? `?revise=${encodeURIComponent(revise)}`
      : from
        ? `?from=${encodeURIComponent(from)}`
        : fromLayout
          ? `?layoutPlan=${encodeURIComponent(layoutPlan)}&candidate=${candidate}`
          : ""
  }`;
  await guardPage(workspaceId, "uploadData", returnTo);

  const saved = revise
    ? await findReportAnalysisForForm(workspaceId, revise)
    : from
      ? await findAnalysisForForm(workspaceId, from)
      : fromLayout
        ? await findLayoutCandidateForForm(workspaceId, layoutPlan, candidate)
        : undefined;
  const [datasets, layouts, weights] = await Promise.all([
    listDataFiles(workspaceId, "dataset").then((files) =>
      withFile(workspaceId, files, saved?.datasetFileId),
    ),
    listDataFiles(workspaceId, "layout").then((files) =>
      withFile(workspaceId, files, saved?.layoutFileId),
    ),
    listDataFiles(workspaceId, "weights").then((files) =>
      withFile(workspaceId, files, saved?.weightsFileId),
    ),
  ]);
  const initialValues = saved ? formValuesFrom(saved, revise) : EMPTY_FORM;
  const missing = (revise || from || fromLayout) && !saved;

  return (
    <div className="space-y-6">
      <header className="space-y-1">
        <h1 className="text-2xl font-semibold">
          {revise
            ? "Revise a report"
            : from
              ? "Run again"
              : fromLayout
                ? "Analyse a planned layout"
                : "New analysis"}
        </h1>
        <p className="max-w-prose text-ink-soft">
          {saved && fromLayout
            ? "The dataset, the chosen layout's partition map and the plan's options are filled in; start the analysis to make the layout a versioned report others can review."
            : saved
              ? "The choices of the earlier run are filled in; change what you need and run it again."
              : "Upload a labelled dataset and say how it is split into shards; Partita measures the shards' heterogeneity and advises local updates or large minibatches for your plan."}
        </p>
      </header>
      {missing ? (
        <Notice tone="error">
          The {revise ? "report" : fromLayout ? "layout" : "analysis"} to start from is not in this
          workspace; the form starts empty.
        </Notice>
      ) : null}
      <AnalysisForm
        workspaceId={workspaceId}
        maxBytes={env().UPLOAD_MAX_BYTES}
        initialFiles={{ datasets, layouts, weights }}
        initialValues={initialValues}
        actions={{
          startAnalysis: startAnalysis.bind(null, workspaceId),
          estimateSimulation: estimateSimulation.bind(null, workspaceId),
          registerDataFile: registerDataFile.bind(null, workspaceId),
          deleteDataFile: deleteDataFile.bind(null, workspaceId),
          previewDatasetAs: previewDatasetAs.bind(null, workspaceId),
        }}
      />
    </div>
  );
}
