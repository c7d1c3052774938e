"use client";

import { useFormState } from "react-hook-form";
import { FormField } from "@/components/analyses/analysis-fields";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { Button } from "@/components/ui/button";

/** The report's title (by default the dataset and layout names) and the button that starts it. */
export function StartSection({ defaultTitle }: { defaultTitle: string }) {
  const { isSubmitting } = useFormState<AnalysisFormValues>();
  return (
    <section className="space-y-4 rounded-lg border border-ink/10 bg-white p-5">
      <div className="max-w-xl">
        <FormField
          id="title"
          label="Title (optional)"
          path="title"
          placeholder={defaultTitle}
          hint="Shown on the report; by default the dataset and layout names."
        />
      </div>
      <Button type="submit" disabled={isSubmitting}>
        {isSubmitting ? "Starting…" : "Run analysis"}
      </Button>
    </section>
  );
}
