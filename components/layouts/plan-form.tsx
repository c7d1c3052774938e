"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition, type FormEvent } from "react";
import { PLAN_DEFAULTS } from "@/lib/validation/analysis-options";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SelectField } from "@/components/ui/select-field";
import type { ActionResult } from "@/lib/actions/result";
import type { LayoutSpec } from "@/lib/analysis";
import type { GeneratorChoice } from "@/lib/layout-plans/plan-form-defaults";
import type { LayoutPlanInput } from "@/lib/validation/layout-plan";

/** A registered dataset as the form offers it: its name and the columns its preview found. */
export interface PlanDataset {
  id: string;
  name: string;
  columns: string[];
}

interface GeneratorState {
  checked: boolean;
  /** The parameter as typed, so a half-typed number is kept. */
  value: string;
}

const NONE = "";

/**
 * The layout plan form (methods.md §8): a dataset, its label, optional id and group columns and
 * features, M, the seed, the training plan every candidate is scored for, and the generators with
 * their parameters. Plain inputs in reading order, so it is filled in with the keyboard alone.
 */
export function PlanForm({
  workspaceId,
  datasets,
  choices,
  defaultShards,
  startLayoutPlan,
}: {
  workspaceId: string;
  datasets: PlanDataset[];
  choices: GeneratorChoice[];
  defaultShards: number;
  /** The route's action that queues the plan, bound to the workspace. */
  startLayoutPlan: (input: LayoutPlanInput) => Promise<ActionResult<{ planId: string }>>;
}) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [datasetId, setDatasetId] = useState(datasets[0]?.id ?? NONE);
  const dataset = datasets.find((entry) => entry.id === datasetId);
  const columns = dataset?.columns ?? [];
  const [title, setTitle] = useState("");
  const [labelColumn, setLabelColumn] = useState(NONE);
  const [idColumn, setIdColumn] = useState(NONE);
  const [groupColumn, setGroupColumn] = useState(NONE);
  const [features, setFeatures] = useState<string[]>([]);
  const [shardCount, setShardCount] = useState(String(defaultShards));
  const [seed, setSeed] = useState("1");
  const [participants, setParticipants] = useState("");
  const [localSteps, setLocalSteps] = useState(String(PLAN_DEFAULTS.localSteps));
  const [rounds, setRounds] = useState(String(PLAN_DEFAULTS.rounds));
  const [batchSize, setBatchSize] = useState(String(PLAN_DEFAULTS.batchSize));
  const [lambda, setLambda] = useState(String(PLAN_DEFAULTS.lambda));
  const [reference, setReference] = useState<"optimum" | "zero">("optimum");
  const [generators, setGenerators] = useState<Record<string, GeneratorState>>(() =>
    Object.fromEntries(
      choices.map((choice) => [
        choice.key,
        {
          checked: !choice.usesGroups,
          value: choice.parameter ? String(choice.parameter.initial) : "",
        },
      ]),
    ),
  );
  const [message, setMessage] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});

  const chooseDataset = (id: string) => {
    setDatasetId(id);
    setLabelColumn(NONE);
    setIdColumn(NONE);
    setGroupColumn(NONE);
    setFeatures([]);
  };
  const chooseGroupColumn = (column: string) => {
    setGroupColumn(column);
    // A group column brings the group generators in; without one they cannot run.
    setGenerators((current) => {
      const next = { ...current };
      for (const choice of choices.filter((entry) => entry.usesGroups)) {
        next[choice.key] = { ...next[choice.key], checked: column !== NONE };
      }
      return next;
    });
  };
  const setGenerator = (key: string, change: Partial<GeneratorState>) =>
    setGenerators((current) => ({ ...current, [key]: { ...current[key], ...change } }));

  const featureChoices = columns.filter(
    (column) => ![labelColumn, idColumn, groupColumn].includes(column),
  );

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const specs = choices
      .filter((choice) => generators[choice.key].checked)
      .map((choice): LayoutSpec => {
        if (!choice.parameter) return choice.spec;
        return {
          ...choice.spec,
          [choice.parameter.field]: Number(generators[choice.key].value),
        } as LayoutSpec;
      });
    const input: LayoutPlanInput = {
      title: title.trim() || `${dataset?.name ?? "dataset"} · ${shardCount} shards`,
      datasetFileId: datasetId,
      options: {
        labelColumn,
        ...(idColumn !== NONE && { idColumn }),
        ...(features.length > 0 && {
          features: features.filter((f) => featureChoices.includes(f)),
        }),
        lambda: Number(lambda),
        localSteps: Number(localSteps),
        rounds: Number(rounds),
        batchSize: Number(batchSize),
        ...(participants.trim() !== "" && { participants: Number(participants) }),
        reference,
      },
      ...(groupColumn !== NONE && { groupColumn }),
      shardCount: Number(shardCount),
      generators: specs,
      seed: Number(seed),
    };
    setMessage(null);
    setFieldErrors({});
    startTransition(async () => {
      const result = await startLayoutPlan(input);
      if (result.ok) {
        router.push(`/w/${workspaceId}/layouts/${result.data.planId}`);
        return;
      }
      setMessage(result.message);
      setFieldErrors(result.fieldErrors);
    });
  };

  const error = (path: string) => fieldErrors[path];

  return (
    <form onSubmit={submit} noValidate className="space-y-8" aria-label="Plan layouts">
      {message ? <Notice tone="error">{message}</Notice> : null}

      <fieldset className="space-y-4">
        <legend className="text-lg font-semibold">Dataset and columns</legend>
        <SelectField
          label="Dataset"
          name="datasetFileId"
          value={datasetId}
          onChange={(event) => chooseDataset(event.target.value)}
          error={error("datasetFileId")}
        >
          {datasets.map((entry) => (
            <option key={entry.id} value={entry.id}>
              {entry.name}
            </option>
          ))}
        </SelectField>
        <div className="grid gap-4 sm:grid-cols-3">
          <SelectField
            label="Label column"
            name="labelColumn"
            value={labelColumn}
            onChange={(event) => setLabelColumn(event.target.value)}
            error={error("options.labelColumn")}
            required
          >
            <option value={NONE}>Choose the label…</option>
            {columns.map((column) => (
              <option key={column} value={column}>
                {column}
              </option>
            ))}
          </SelectField>
          <SelectField
            label="Row id column"
            name="idColumn"
            value={idColumn}
            onChange={(event) => setIdColumn(event.target.value)}
            hint="Without one, maps name rows by their 0-based position."
          >
            <option value={NONE}>Row position</option>
            {columns.map((column) => (
              <option key={column} value={column}>
                {column}
              </option>
            ))}
          </SelectField>
          <SelectField
            label="Group column (optional)"
            name="groupColumn"
            value={groupColumn}
            onChange={(event) => chooseGroupColumn(event.target.value)}
            error={error("groupColumn")}
            hint="Rows of one user, device or site stay in one shard."
          >
            <option value={NONE}>No groups</option>
            {columns.map((column) => (
              <option key={column} value={column}>
                {column}
              </option>
            ))}
          </SelectField>
        </div>
        {featureChoices.length > 0 ? (
          <fieldset className="space-y-2">
            <legend className="text-sm font-medium">Features</legend>
            <p className="text-sm text-ink-soft">None ticked: every other column is a feature.</p>
            <div className="grid gap-1 sm:grid-cols-3">
              {featureChoices.map((column) => (
                <label key={column} className="flex items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    checked={features.includes(column)}
                    onChange={(event) =>
                      setFeatures((current) =>
                        event.target.checked
                          ? [...current, column]
                          : current.filter((entry) => entry !== column),
                      )
                    }
                  />
                  {column}
                </label>
              ))}
            </div>
          </fieldset>
        ) : null}
      </fieldset>

      <fieldset className="space-y-4">
        <legend className="text-lg font-semibold">Shards and plan</legend>
        <div className="grid gap-4 sm:grid-cols-3">
          <Field
            label="Shards (M)"
            name="shardCount"
            type="number"
            min={2}
            inputMode="numeric"
            value={shardCount}
            onChange={(event) => setShardCount(event.target.value)}
            error={error("shardCount")}
          />
          <Field
            label="Seed"
            name="seed"
            type="number"
            min={0}
            inputMode="numeric"
            value={seed}
            onChange={(event) => setSeed(event.target.value)}
            error={error("seed")}
            hint="The same seed gives the same layouts."
          />
          <Field
            label="Participants per round"
            name="participants"
            type="number"
            min={1}
            inputMode="numeric"
            placeholder="All shards"
            value={participants}
            onChange={(event) => setParticipants(event.target.value)}
            error={error("options.participants")}
          />
          <Field
            label="Local steps (K)"
            name="localSteps"
            type="number"
            min={1}
            value={localSteps}
            onChange={(event) => setLocalSteps(event.target.value)}
            error={error("options.localSteps")}
          />
          <Field
            label="Rounds (R)"
            name="rounds"
            type="number"
            min={1}
            value={rounds}
            onChange={(event) => setRounds(event.target.value)}
            error={error("options.rounds")}
          />
          <Field
            label="Batch size (b)"
            name="batchSize"
            type="number"
            min={1}
            value={batchSize}
            onChange={(event) => setBatchSize(event.target.value)}
            error={error("options.batchSize")}
          />
          <Field
            label="Regularization (λ)"
            name="lambda"
            inputMode="decimal"
            value={lambda}
            onChange={(event) => setLambda(event.target.value)}
            error={error("options.lambda")}
          />
          <SelectField
            label="Reference point"
            name="reference"
            value={reference}
            onChange={(event) => setReference(event.target.value as "optimum" | "zero")}
          >
            <option value="optimum">Pooled optimum W*</option>
            <option value="zero">Start W = 0</option>
          </SelectField>
        </div>
      </fieldset>

      <fieldset className="space-y-3">
        <legend className="text-lg font-semibold">Candidate generators</legend>
        {error("generators") ? <Notice tone="error">{error("generators")}</Notice> : null}
        <ul className="divide-y divide-ink/10 rounded-md border border-ink/10 bg-white">
          {choices.map((choice) => {
            const state = generators[choice.key];
            const disabled = choice.usesGroups && groupColumn === NONE;
            const id = `generator-${choice.key}`;
            return (
              <li key={choice.key} className="flex flex-wrap items-start gap-3 px-3 py-2">
                <input
                  id={id}
                  type="checkbox"
                  className="mt-1"
                  checked={state.checked && !disabled}
                  disabled={disabled}
                  onChange={(event) => setGenerator(choice.key, { checked: event.target.checked })}
                  aria-describedby={`${id}-models`}
                />
                <div className="min-w-0 flex-1">
                  <label htmlFor={id} className="font-mono text-sm font-medium">
                    {choice.spec.generator}
                  </label>
                  <p id={`${id}-models`} className="text-sm text-ink-soft">
                    {choice.models}
                    {disabled ? " (needs a group column)" : ""}
                  </p>
                </div>
                {choice.parameter ? (
                  <label className="flex items-center gap-2 text-sm">
                    {choice.parameter.symbol} =
                    <input
                      className="w-20 rounded-md border border-ink/20 px-2 py-1 text-sm"
                      inputMode="decimal"
                      aria-label={`${choice.spec.generator} ${choice.parameter.symbol}`}
                      value={state.value}
                      onChange={(event) => setGenerator(choice.key, { value: event.target.value })}
                    />
                  </label>
                ) : null}
              </li>
            );
          })}
        </ul>
      </fieldset>

      <Field
        label="Title (optional)"
        name="title"
        value={title}
        placeholder={`${dataset?.name ?? "dataset"} · ${shardCount} shards`}
        onChange={(event) => setTitle(event.target.value)}
        error={error("title")}
      />
      <Button type="submit" disabled={pending || datasetId === NONE}>
        {pending ? "Queuing…" : "Plan layouts"}
      </Button>
    </form>
  );
}
