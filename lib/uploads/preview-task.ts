import type { DataFilePreview } from "@/db/schema/analyses";
import { MAX_CLASSES_FOR_NUMERIC_LABEL } from "@/lib/analysis/browser";

/**
 * How the engine will treat a label (methods.md §1), as far as its preview column shows: regression
 * for a numeric label with more than 20 distinct values, classification otherwise.
 */
export function detectTask(
  label: DataFilePreview["columns"][number],
): "classification" | "regression" {
  return label.type === "numeric" && label.distinct > MAX_CLASSES_FOR_NUMERIC_LABEL
    ? "regression"
    : "classification";
}
