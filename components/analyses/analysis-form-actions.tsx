"use client";

import { createContext, useContext, type ReactNode } from "react";
import type { DataFilePreview } from "@/db/schema/analyses";
import type { ActionResult } from "@/lib/actions/result";
import type { CsvFormatChoice } from "@/lib/analysis/browser";
import type { SimulationCostView } from "@/lib/reports/simulation-estimate";
import type { RegisteredFile } from "@/lib/uploads/register-upload";
import type { StartAnalysisInput } from "@/lib/validation/start-analysis";
import type { RegisterDataFileInput } from "@/lib/validation/upload";

/**
 * The new-analysis page's server actions (its route's actions.ts files), bound by the page to the
 * workspace. The form's steps reach them through this context rather than by props through every
 * level, and never by importing from app/.
 */
export interface AnalysisFormActions {
  startAnalysis: (input: StartAnalysisInput) => Promise<ActionResult<{ analysisId: string }>>;
  estimateSimulation: (
    input: StartAnalysisInput,
  ) => Promise<ActionResult<SimulationCostView | null>>;
  registerDataFile: (input: RegisterDataFileInput) => Promise<ActionResult<RegisteredFile>>;
  deleteDataFile: (fileId: string) => Promise<ActionResult>;
  previewDatasetAs: (
    fileId: string,
    choice: CsvFormatChoice,
  ) => Promise<ActionResult<DataFilePreview>>;
}

const ActionsContext = createContext<AnalysisFormActions | null>(null);

export function AnalysisFormActionsProvider({
  actions,
  children,
}: {
  actions: AnalysisFormActions;
  children: ReactNode;
}) {
  return <ActionsContext.Provider value={actions}>{children}</ActionsContext.Provider>;
}

export function useAnalysisFormActions(): AnalysisFormActions {
  const actions = useContext(ActionsContext);
  if (!actions) throw new Error("useAnalysisFormActions is used outside the new-analysis form");
  return actions;
}
