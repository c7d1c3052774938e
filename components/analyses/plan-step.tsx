"use client";

import type { ReactNode } from "react";
import { ChoiceGroup, FormField, WHOLE_NUMBER } from "@/components/analyses/analysis-fields";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { FormStep } from "@/components/analyses/form-controls";
import { SimulationFieldset } from "@/components/analyses/simulation-fieldset";
import { describeTooFewShards, type PreviewedShards } from "@/lib/validation/shard-count";

const PARTICIPANT_MODES = [
  { value: "all", title: "All shards", detail: "Every shard takes part in every round." },
  { value: "sample", title: "A sample of shards", detail: "A fixed number of shards per round." },
] as const;

/** The plan's counts (methods.md §2), in the order they show; M only for a sample of shards. */
const PLAN_COUNTS = [
  {
    id: "participants",
    label: "Shards per round (M)",
    path: "options.participants",
    sampleOnly: true,
  },
  { id: "local-steps", label: "Local steps per round (K)", path: "options.localSteps" },
  { id: "rounds", label: "Rounds (R)", path: "options.rounds" },
  { id: "batch-size", label: "Batch size (b)", path: "options.batchSize" },
] as const;

/**
 * What the participants field says about the layout's shards as the user types: how many the
 * preview shows, and — when the preview read the whole layout — the server's refusal of an M above
 * that count before the form is sent. A count from part of a file is a lower bound and only shown.
 */
function participantsHint(
  shards: PreviewedShards | undefined,
  participants: number | undefined,
): ReactNode {
  if (!shards) return undefined;
  if (shards.complete && participants !== undefined && participants > shards.count) {
    return (
      <span className="font-medium text-cadmium">
        {describeTooFewShards(participants, shards.count, shards.where)}
      </span>
    );
  }
  const count = `${shards.count} ${shards.count === 1 ? "shard" : "shards"}`;
  return shards.complete
    ? `The ${shards.where} names ${count}.`
    : `The ${shards.where} names at least ${count} in the rows previewed.`;
}

/** Step 5: the training plan, and whether to simulate it. */
export function PlanStep({
  workspaceId,
  values,
  shards,
}: {
  workspaceId: string;
  values: AnalysisFormValues;
  /** The layout's shards as its preview shows them, when there is one. */
  shards?: PreviewedShards;
}) {
  return (
    <FormStep
      number={5}
      title="Plan"
      intro="The training you intend: Partita compares local SGD with minibatch SGD for it."
    >
      <PlanFields
        sampled={values.participantsMode === "sample"}
        participantsHint={participantsHint(shards, values.options.participants)}
      />
      <SimulationFieldset workspaceId={workspaceId} values={values} />
    </FormStep>
  );
}

/**
 * The plan's fields (participants, K, R, b), also used by the federated analysis form, whose
 * values carry the same names.
 */
export function PlanFields({
  sampled,
  participantsHint,
}: {
  sampled: boolean;
  /** What the participants field says about the layout's shards. */
  participantsHint?: ReactNode;
}) {
  return (
    <>
      <ChoiceGroup
        legend="Participants per round (M)"
        path="participantsMode"
        choices={PARTICIPANT_MODES}
        columns={2}
      />
      <div className="grid gap-4 md:grid-cols-4">
        {PLAN_COUNTS.filter((count) => sampled || !("sampleOnly" in count)).map((count) => (
          <FormField
            key={count.id}
            id={count.id}
            label={count.label}
            path={count.path}
            hint={count.id === "participants" ? participantsHint : undefined}
            {...WHOLE_NUMBER}
          />
        ))}
      </div>
    </>
  );
}
