import type { ReferenceWeights } from "../../validation/analysis-options";
import type { Task } from "../design";
import { AnalysisInputError } from "../errors";
import { readGivenWeights } from "../reference-weights";
import type { PartitionSummary } from "../summary";
import type { DigestEncoding, MeasurementRequest } from "./digest-format";
import { fitPooledOptimum, mergeEvaluationSums } from "./fit-pooled-optimum";
import type { DigestClientConnection } from "./local-client";
import { mergeGradientDigests, type DigestPlan } from "./merge-gradients";
import { mergeSchemaDigests } from "./merge-schemas";

export interface DigestAnalysisOptions {
  task?: Task;
  lambda: number;
  reference: "optimum" | "zero" | ReferenceWeights;
  plan: DigestPlan;
  minimumShardRows?: number;
  /** Clients expected but left out when the roster was closed (the report lists them). */
  missingClients?: string[];
  /** Progress: the round the coordinator is in, and the fit's evaluations so far. */
  onRound?: (round: "schema" | "fit" | "gradients" | "merge", evaluations?: number) => void;
  /**
   * A client's request failed (a lost connection): resolve "retry" once it can answer again (it
   * rejoined) or "fail" to end the analysis. Answers already received are kept either way, so only
   * that client's request is asked again. Default: fail.
   */
  onClientError?: (client: string, error: unknown) => Promise<"retry" | "fail">;
}

/**
 * The coordinator of a federated analysis (methods.md §9), with every client reachable through a
 * connection: round 1 and its merge into the encoding, the fit of W* from the clients' evaluations
 * (always, as the central analysis fits it for B and the path), round 2 at the reference point and
 * along t·W*, and the merge into the §6 summary — the central analysis's summary of the same rows.
 */
export async function analyzeFromDigests(
  clients: DigestClientConnection[],
  options: DigestAnalysisOptions,
): Promise<PartitionSummary> {
  const ask = <Answer>(request: (client: DigestClientConnection) => Promise<Answer>) =>
    Promise.all(clients.map((client) => askUntilAnswered(client, request, options.onClientError)));
  options.onRound?.("schema");
  const schemas = await ask((client) => client.schema());
  const encoding = mergeSchemaDigests(schemas, {
    task: options.task,
    minimumShardRows: options.minimumShardRows,
  });
  options.onRound?.("fit", 0);
  const gram =
    encoding.task === "regression"
      ? sumGrams(await ask((client) => client.gram(encoding)), encoding)
      : undefined;
  const fit = await fitPooledOptimum(
    encoding,
    async (request) =>
      mergeEvaluationSums(await ask((client) => client.evaluate(encoding, request))),
    {
      lambda: options.lambda,
      schemas,
      gram,
      onEvaluation: (evaluations) => options.onRound?.("fit", evaluations),
    },
  );
  options.onRound?.("gradients");
  const request = createMeasurementRequest(encoding, options.reference, fit.weights);
  const digests = await ask((client) => client.gradients(encoding, request));
  options.onRound?.("merge");
  return mergeGradientDigests(encoding, digests, {
    lambda: options.lambda,
    plan: options.plan,
    fit,
    missingClients: options.missingClients,
  });
}

/**
 * Round 2's request: the reference point (W*, zero or the given weights, checked against the
 * encoding) and the path's end — W* when it was fitted, else the reference itself.
 */
export function createMeasurementRequest(
  encoding: DigestEncoding,
  reference: "optimum" | "zero" | ReferenceWeights,
  optimum: Float64Array | null,
): MeasurementRequest {
  const width = encoding.columns.length + 1;
  const weightRows = encoding.classes === null ? 1 : encoding.classes.length;
  const asRows = (weights: Float64Array) =>
    Array.from({ length: weightRows }, (_, c) =>
      Array.from(weights.subarray(c * width, (c + 1) * width)),
    );
  let referenceWeights: number[][];
  if (reference === "optimum") {
    if (optimum === null) {
      throw new AnalysisInputError("the pooled optimum needs the clients online for its fit", {
        expected: "a supplied reference (weights) or zero for digests exchanged as files",
      });
    }
    referenceWeights = asRows(optimum);
  } else if (reference === "zero") {
    referenceWeights = asRows(new Float64Array(weightRows * width));
  } else {
    readGivenWeights(reference, {
      featureNames: encoding.featureNames,
      classes: encoding.classes,
      width,
    });
    referenceWeights = reference.weights;
  }
  return {
    encodingHash: encoding.hash,
    reference: reference === "optimum" ? "optimum" : reference === "zero" ? "zero" : "given",
    referenceWeights,
    pathEnd: optimum === null ? referenceWeights : asRows(optimum),
  };
}

/** One client's answer, asked again after each failure the host says to retry. */
async function askUntilAnswered<Answer>(
  client: DigestClientConnection,
  request: (client: DigestClientConnection) => Promise<Answer>,
  onClientError: DigestAnalysisOptions["onClientError"],
): Promise<Answer> {
  for (;;) {
    try {
      return await request(client);
    } catch (error) {
      if (!onClientError || (await onClientError(client.name, error)) === "fail") throw error;
    }
  }
}

function sumGrams(parts: number[][][], encoding: DigestEncoding): Float64Array {
  const width = encoding.columns.length + 1;
  const gram = new Float64Array(width * width);
  for (const part of parts) {
    part.forEach((row, j) => row.forEach((value, k) => (gram[j * width + k] += value)));
  }
  return gram;
}
