"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { FormProvider, useForm, useWatch, type FieldPath } from "react-hook-form";
import { ChoiceGroup } from "@/components/analyses/analysis-fields";
import { FormStep } from "@/components/analyses/form-controls";
import { PlanFields } from "@/components/analyses/plan-step";
import { ReferencePointFields } from "@/components/analyses/reference-step";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";
import { federatedFormSchema, type FederatedFormValues } from "@/lib/validation/federated-form";
import { FederatedField, FederatedTextArea } from "./federated-fields";
import { WeightsFileField } from "./weights-file-field";

const TASKS = [
  {
    value: "auto",
    title: "Detect from the label",
    detail: "Classification for text or up to 20 distinct values, seen across all clients.",
  },
  { value: "classification", title: "Classification", detail: "Multinomial logistic regression." },
  { value: "regression", title: "Regression", detail: "Least squares on the standardized target." },
] as const;

/**
 * The new federated analysis: what every client measures (label, features, task), the reference
 * point and plan, and who is expected. Values survive every failed submit; the server's refusals
 * land on the fields they are about.
 */
export function FederatedForm({
  workspaceId,
  initialValues,
  createFederated,
}: {
  workspaceId: string;
  initialValues: FederatedFormValues;
  /** The route's action, bound to the workspace. */
  createFederated: (values: FederatedFormValues) => Promise<ActionResult<{ analysisId: string }>>;
}) {
  const router = useRouter();
  const [notice, setNotice] = useState<string>();
  const form = useForm<FederatedFormValues>({
    resolver: zodResolver(federatedFormSchema),
    defaultValues: initialValues,
  });
  const referenceSource = useWatch({ control: form.control, name: "referenceSource" });
  const participantsMode = useWatch({ control: form.control, name: "participantsMode" });

  const submit = form.handleSubmit(async (values) => {
    setNotice(undefined);
    const result = await createFederated(values);
    if (result.ok) {
      router.push(`/w/${workspaceId}/federated/${result.data.analysisId}`);
      return;
    }
    const unplaced: string[] = [];
    for (const [path, message] of Object.entries(result.fieldErrors)) {
      if (path === "form") unplaced.push(message);
      else form.setError(path as FieldPath<FederatedFormValues>, { message });
    }
    setNotice(
      unplaced.length > 0
        ? unplaced.join(" ")
        : Object.keys(result.fieldErrors).length > 0
          ? "Some choices need attention; see the marked fields."
          : result.message,
    );
  });

  return (
    <FormProvider {...form}>
      <form onSubmit={submit} noValidate className="space-y-6" aria-label="New federated analysis">
        {notice ? <Notice tone="error">{notice}</Notice> : null}
        <FormStep
          number={1}
          title="What every client measures"
          intro="Each client reads its own file with these columns; no row leaves it."
        >
          <FederatedField id="federated-title" label="Title" path="title" maxLength={200} />
          <div className="grid gap-4 md:grid-cols-2">
            <FederatedField
              id="federated-label"
              label="Label column"
              path="options.labelColumn"
              hint="The same column name in every client's file."
            />
            <FederatedTextArea
              id="federated-features"
              label="Feature columns (optional)"
              path="options.featuresText"
              hint="Separated by commas or new lines; empty: every column but the label, id and shard columns."
            />
          </div>
          <ChoiceGroup legend="Task" path="options.task" choices={TASKS} columns={3} />
        </FormStep>
        <FormStep
          number={2}
          title="Reference model"
          intro="Heterogeneity is measured at a reference point of a convex proxy model; the pooled optimum keeps every client connected while the server fits it."
        >
          <ReferencePointFields />
          {referenceSource === "weights" ? <WeightsFileField /> : null}
        </FormStep>
        <FormStep
          number={3}
          title="Plan"
          intro="The training you intend: Partita compares local SGD with minibatch SGD for it."
        >
          <PlanFields sampled={participantsMode === "sample"} />
        </FormStep>
        <FormStep
          number={4}
          title="Clients"
          intro="Who is expected to send digests. Each gets its own key on the next page."
        >
          <div className="grid gap-4 md:grid-cols-2">
            <FederatedTextArea
              id="federated-clients"
              label="Expected clients"
              path="clientsText"
              rows={5}
              hint="One name a line, e.g. the site or device group; names appear on the roster and in the report."
            />
            <div className="max-w-xs">
              <FederatedField
                id="federated-minimum-rows"
                label="Minimum rows per shard"
                path="minimumShardRows"
                type="number"
                min={1}
                step={1}
                hint="Digests of a smaller shard are refused, so no shard's sums stand for a handful of rows."
              />
            </div>
          </div>
        </FormStep>
        <div className="flex items-center gap-3">
          <Button type="submit" disabled={form.formState.isSubmitting}>
            {form.formState.isSubmitting ? "Creating…" : "Create the federated analysis"}
          </Button>
          <span className="text-xs text-ink-soft">Nothing is sent to any client yet.</span>
        </div>
      </form>
    </FormProvider>
  );
}
