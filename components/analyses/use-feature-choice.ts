"use client";

import { useState } from "react";
import { useFormContext } from "react-hook-form";
import { useSetChoice } from "@/components/analyses/analysis-form-hooks";
import {
  reservedColumns,
  usableFeatures,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";

const COLUMN_CHOICES = ["options.labelColumn", "options.idColumn", "options.shardColumn"] as const;

/**
 * Keeps the features in step with the other column choices: every usable column until the user
 * picks features (or a re-run names them), and never the label, id or shard column.
 */
export function useFeatureChoice(initiallyChosen: boolean) {
  const { getValues, setValue } = useFormContext<AnalysisFormValues>();
  const setChoice = useSetChoice();
  const [chosen, setChosen] = useState(initiallyChosen);

  function refreshFeatures(names: string[], keepChosen = chosen) {
    const usable = usableFeatures(names, reservedColumns(getValues()));
    const current = getValues("options.features");
    setChoice(
      "options.features",
      keepChosen ? current.filter((name) => usable.includes(name)) : usable,
    );
  }

  return {
    refreshFeatures,
    /** A different dataset keeps only the column choices (and picked features) it also has. */
    followDataset(names: string[]) {
      for (const path of COLUMN_CHOICES) {
        if (!names.includes(getValues(path))) setValue(path, "");
      }
      const keepsFeatures =
        chosen && getValues("options.features").some((name) => names.includes(name));
      setChosen(keepsFeatures);
      refreshFeatures(names, keepsFeatures);
    },
    chooseAll(usable: string[]) {
      setChosen(false);
      setChoice("options.features", usable);
    },
    chooseNone() {
      setChosen(true);
      setChoice("options.features", []);
    },
    markChosen: () => setChosen(true),
  };
}
