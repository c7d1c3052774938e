import type { FieldPath } from "react-hook-form";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";

/** Every field the server may name in its field errors, by its request path. */
const FIELD_PATHS = new Set<string>([
  "title",
  "datasetFileId",
  "layoutFileId",
  "weightsFileId",
  "options.labelColumn",
  "options.idColumn",
  "options.shardColumn",
  "options.features",
  "options.task",
  "options.lambda",
  "options.participants",
  "options.localSteps",
  "options.rounds",
  "options.batchSize",
  "options.simulate",
  "options.simulate.seeds",
]);

/**
 * Sorts a refused start's errors into those a field shows and the notice above the form: the
 * messages no field can show, else a pointer to the marked fields, else the server's message.
 */
export function placeServerErrors(
  fieldErrors: Record<string, string>,
  message: string,
): { onFields: [FieldPath<AnalysisFormValues>, string][]; notice: string } {
  const onFields: [FieldPath<AnalysisFormValues>, string][] = [];
  const unplaced: string[] = [];
  for (const [path, fieldMessage] of Object.entries(fieldErrors)) {
    if (FIELD_PATHS.has(path)) onFields.push([path as FieldPath<AnalysisFormValues>, fieldMessage]);
    else unplaced.push(fieldMessage);
  }
  const notice =
    unplaced.length > 0
      ? unplaced.join(" ")
      : onFields.length > 0
        ? "Some choices need attention; see the marked fields."
        : message;
  return { onFields, notice };
}
