"use client";

import { useQuery } from "@tanstack/react-query";
import { useAnalysisFormActions } from "@/components/analyses/analysis-form-actions";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import type { DataFileSummary } from "@/db/queries/data-files";
import type { CsvFormatChoice } from "@/lib/analysis/browser";

/**
 * The reading options the user changed from those detected at upload, or null while the detected
 * ones apply (or the file is not a CSV, or its preview predates the detection).
 */
export function formatOverride(
  dataset: DataFileSummary | undefined,
  options: Pick<AnalysisFormValues["options"], "encoding" | "delimiter" | "decimalMark">,
): CsvFormatChoice | null {
  const detected = dataset?.preview?.format;
  if (!detected) return null;
  if (options.encoding === detected.encoding && !options.delimiter && !options.decimalMark) {
    return null;
  }
  return {
    encoding: options.encoding,
    delimiter: options.delimiter || undefined,
    decimalMark: options.decimalMark || undefined,
  };
}

/**
 * The chosen dataset's preview as the run will read it: the stored one while the detected reading
 * options apply, otherwise the server's re-read in the chosen ones (the stored preview stays up
 * while that loads). `error` is the server's message when the file cannot be read that way.
 */
export function useDatasetPreview(
  workspaceId: string,
  dataset: DataFileSummary | undefined,
  options: AnalysisFormValues["options"],
) {
  const { previewDatasetAs } = useAnalysisFormActions();
  const override = formatOverride(dataset, options);
  const query = useQuery({
    queryKey: ["dataset-preview", workspaceId, dataset?.id, override],
    queryFn: async () => {
      const result = await previewDatasetAs(dataset!.id, override!);
      if (!result.ok) throw new Error(result.message);
      return result.data;
    },
    enabled: override !== null,
    staleTime: Infinity,
    retry: false,
  });
  const reread = override !== null && query.data !== undefined;
  return {
    preview: reread ? query.data : (dataset?.preview ?? null),
    reading: override !== null && query.isFetching,
    error: override !== null && query.error ? query.error.message : undefined,
  };
}
