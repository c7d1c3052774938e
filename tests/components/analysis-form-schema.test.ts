import { describe, expect, it } from "vitest";
import {
  analysisFormSchema,
  EMPTY_FORM,
  formValuesFrom,
  toStartAnalysisInput,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";
import { startAnalysisSchema } from "@/lib/validation/start-analysis";

const filled: AnalysisFormValues = {
  ...EMPTY_FORM,
  datasetFileId: "d1",
  options: {
    ...EMPTY_FORM.options,
    labelColumn: "Species",
    shardColumn: "Island",
    features: ["Beak Length (mm)", "Sex"],
  },
};

/** Field path → first message, as react-hook-form shows them. */
function errorsOf(values: AnalysisFormValues): Record<string, string> {
  const result = analysisFormSchema.safeParse(values);
  const errors: Record<string, string> = {};
  if (!result.success) {
    for (const issue of result.error.issues) errors[issue.path.join(".")] ??= issue.message;
  }
  return errors;
}

describe("the new-analysis form's values", () => {
  it("start at methods.md's plan defaults: λ 1e-3, K 10, R 100, b 32, all shards", () => {
    expect(EMPTY_FORM.options).toMatchObject({
      lambda: 1e-3,
      localSteps: 10,
      rounds: 100,
      batchSize: 32,
      task: "auto",
    });
    expect(EMPTY_FORM.participantsMode).toBe("all");
  });

  it("become a request the server's schema accepts", () => {
    expect(errorsOf(filled)).toEqual({});
    const input = toStartAnalysisInput(filled);
    expect(input).toEqual({
      title: undefined,
      datasetFileId: "d1",
      layoutFileId: undefined,
      weightsFileId: undefined,
      previousReportId: undefined,
      options: {
        labelColumn: "Species",
        idColumn: undefined,
        shardColumn: "Island",
        features: ["Beak Length (mm)", "Sex"],
        task: undefined,
        lambda: 1e-3,
        reference: "optimum",
        participants: undefined,
        localSteps: 10,
        rounds: 100,
        batchSize: 32,
        dropUnassignedRows: false,
        encoding: "utf-8",
        delimiter: undefined,
        decimalMark: undefined,
        badNumbersAsMissing: false,
      },
    });
    expect(startAnalysisSchema.safeParse(input).success).toBe(true);
  });

  it("explain each invalid choice on its own field", () => {
    const errors = errorsOf({
      ...EMPTY_FORM,
      layoutSource: "file",
      referenceSource: "weights",
      participantsMode: "sample",
      options: {
        ...EMPTY_FORM.options,
        lambda: Number.NaN,
        localSteps: 2.5,
        rounds: 0,
        participants: Number.NaN,
      },
    });
    expect(errors).toEqual({
      datasetFileId: "Upload or choose a dataset.",
      "options.labelColumn": "Choose the column that holds the label.",
      "options.lambda": "Enter λ as a number, e.g. 0.001.",
      "options.localSteps": "Enter the number of local steps as a whole number.",
      "options.rounds": "The number of rounds must be at least 1.",
    });
    // Choices that depend on each other are checked once every field is well-formed.
    expect(
      errorsOf({
        ...filled,
        layoutSource: "file",
        referenceSource: "weights",
        participantsMode: "sample",
        options: { ...filled.options, idColumn: "Species", features: [], participants: 0 },
      }),
    ).toEqual({
      "options.idColumn": "The id column cannot also be the label.",
      layoutFileId: "Upload or choose a partition map.",
      "options.features": "Choose at least one feature column.",
      weightsFileId: "Upload or choose a reference weights file.",
      "options.participants": "Enter how many shards take part in each round.",
    });
  });

  it("refill from an earlier analysis, keeping its files and plan", () => {
    const values = formValuesFrom(
      {
        title: "By island",
        datasetFileId: "d1",
        layoutFileId: "l1",
        weightsFileId: null,
        parameters: { labelColumn: "Species", reference: "zero", localSteps: 50, participants: 2 },
      },
      "r1",
    );
    expect(values).toMatchObject({
      title: "By island",
      layoutSource: "file",
      layoutFileId: "l1",
      referenceSource: "zero",
      participantsMode: "sample",
      previousReportId: "r1",
      options: { labelColumn: "Species", localSteps: 50, rounds: 100, participants: 2 },
    });
    expect(
      toStartAnalysisInput({ ...values, options: { ...values.options, features: ["x"] } }),
    ).toMatchObject({ layoutFileId: "l1", previousReportId: "r1", options: { reference: "zero" } });
  });

  it("ask for a simulation only when it is ticked, with 1 to 20 seeds (default 3)", () => {
    // methods.md §7: S defaults to 3; analysisOptionsSchema allows 1 to 20.
    expect(EMPTY_FORM.options.simulate).toEqual({ enabled: false, seeds: 3 });
    expect(toStartAnalysisInput(filled).options.simulate).toBeUndefined();
    // An emptied seeds field does not matter while the simulation is off.
    const off = { ...filled.options, simulate: { enabled: false, seeds: Number.NaN } };
    expect(errorsOf({ ...filled, options: off })).toEqual({});

    const withSeeds = (seeds: number): AnalysisFormValues => ({
      ...filled,
      options: { ...filled.options, simulate: { enabled: true, seeds } },
    });
    const input = toStartAnalysisInput(withSeeds(3));
    expect(input.options.simulate).toEqual({ seeds: 3 });
    // The server fills in its budget and grid seed.
    expect(startAnalysisSchema.parse(input).options.simulate).toEqual({
      seeds: 3,
      seed: 1,
      budget: 1e11,
    });
    expect(errorsOf(withSeeds(1))).toEqual({});
    expect(errorsOf(withSeeds(20))).toEqual({});
    const seedsError = (seeds: number) => errorsOf(withSeeds(seeds))["options.simulate.seeds"];
    expect(seedsError(0)).toBe("The number of seeds must be at least 1.");
    expect(seedsError(21)).toBe("Use at most 20 seeds.");
    expect(seedsError(2.5)).toBe("Enter the number of seeds as a whole number.");
    expect(seedsError(Number.NaN)).toBe("Enter the number of seeds as a whole number.");
  });

  it("refill a simulation from an earlier analysis", () => {
    const values = formValuesFrom({
      title: "By island",
      datasetFileId: "d1",
      layoutFileId: "l1",
      weightsFileId: null,
      parameters: { labelColumn: "Species", simulate: { seeds: 5, seed: 1, budget: 1e11 } },
    });
    expect(values.options.simulate).toEqual({ enabled: true, seeds: 5 });
  });

  it("send the reading options: the detected delimiter and decimal mark are left to the engine", () => {
    const chosen: AnalysisFormValues = {
      ...filled,
      options: {
        ...filled.options,
        encoding: "windows-1252",
        delimiter: ";",
        decimalMark: ",",
        badNumbersAsMissing: true,
      },
    };
    expect(errorsOf(chosen)).toEqual({});
    const options = startAnalysisSchema.parse(toStartAnalysisInput(chosen)).options;
    expect(options).toMatchObject({
      encoding: "windows-1252",
      delimiter: ";",
      decimalMark: ",",
      badNumbersAsMissing: true,
    });
    // "" is the detected choice: absent from the request, so the engine detects it again.
    const detected = toStartAnalysisInput({
      ...chosen,
      options: { ...chosen.options, delimiter: "", decimalMark: "" },
    }).options;
    expect(detected.delimiter).toBeUndefined();
    expect(detected.decimalMark).toBeUndefined();
    // A run again keeps what the earlier run was told.
    const again = formValuesFrom({
      title: "Cities",
      datasetFileId: "d1",
      layoutFileId: null,
      weightsFileId: null,
      parameters: { labelColumn: "label", encoding: "utf-16", decimalMark: "," },
    });
    expect(again.options).toMatchObject({
      encoding: "utf-16",
      delimiter: "",
      decimalMark: ",",
      badNumbersAsMissing: false,
    });
  });
});
