"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { FormProvider, useForm } from "react-hook-form";
import {
  analysisFormSchema,
  toStartAnalysisInput,
  withDefaultFeatures,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";
import {
  AnalysisFormActionsProvider,
  type AnalysisFormActions,
} from "@/components/analyses/analysis-form-actions";
import { AnalysisSteps, type WorkspaceFiles } from "@/components/analyses/analysis-steps";
import { placeServerErrors } from "@/components/analyses/server-field-errors";
import { Notice } from "@/components/ui/notice";

/**
 * The new-analysis form: the dataset, where the shards come from, the column mapping, the
 * reference model and the training plan, in one form whose values survive every failed submit.
 */
export function AnalysisForm({
  workspaceId,
  maxBytes,
  initialFiles,
  initialValues,
  actions,
}: {
  workspaceId: string;
  maxBytes: number;
  initialFiles: WorkspaceFiles;
  initialValues: AnalysisFormValues;
  actions: AnalysisFormActions;
}) {
  const router = useRouter();
  const [notice, setNotice] = useState<string>();
  const form = useForm<AnalysisFormValues>({
    resolver: zodResolver(analysisFormSchema),
    defaultValues: withDefaultFeatures(
      initialValues,
      (
        initialFiles.datasets.find((file) => file.id === initialValues.datasetFileId)?.preview
          ?.columns ?? []
      ).map((column) => column.name),
    ),
  });

  const submit = form.handleSubmit(async (formValues) => {
    setNotice(undefined);
    const result = await actions.startAnalysis(toStartAnalysisInput(formValues));
    if (result.ok) {
      router.push(`/w/${workspaceId}/analyses/${result.data.analysisId}`);
      return;
    }
    const placed = placeServerErrors(result.fieldErrors, result.message);
    for (const [path, message] of placed.onFields) form.setError(path, { message });
    setNotice(placed.notice);
  });

  return (
    <AnalysisFormActionsProvider actions={actions}>
      <FormProvider {...form}>
        <form onSubmit={submit} noValidate className="space-y-6" aria-label="New analysis">
          {notice ? <Notice tone="error">{notice}</Notice> : null}
          {initialValues.previousReportId ? (
            <Notice>
              This run revises an earlier report: its result becomes the report&apos;s next version.
            </Notice>
          ) : null}
          <AnalysisSteps
            workspaceId={workspaceId}
            maxBytes={maxBytes}
            initialFiles={initialFiles}
            // A re-run that names its features keeps them; otherwise they follow the other columns.
            featuresInitiallyChosen={initialValues.options.features.length > 0}
          />
        </form>
      </FormProvider>
    </AnalysisFormActionsProvider>
  );
}
