import type { MemorySettings } from "../memory-limit";
import type { RawDataset } from "../read-dataset";
import { isStoredMatrix, type StoredMatrix } from "../stored-matrix";
import { ClientPasses } from "./client-passes";
import { encodeClientRows } from "./client-rows";
import type {
  DigestEncoding,
  EvaluationRequest,
  EvaluationSums,
  GradientDigest,
  MeasurementRequest,
  SchemaDigest,
} from "./digest-format";
import { computeGradientDigest } from "./gradient-digest";
import { computeSchemaDigest, type SchemaDigestOptions } from "./schema-digest";

/**
 * What the coordinator asks of one client during a federated analysis (methods.md §9). The answers
 * are digests: counts and sums, never a row. Implemented in-process by `LocalDigestClient`, and by
 * the server's connection to a remote client.
 */
export interface DigestClientConnection {
  readonly name: string;
  /** Round 1. */
  schema(): Promise<SchemaDigest>;
  /** One evaluation of the coordinator's fit. */
  evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums>;
  /** Σ x̃ᵢx̃ᵢᵀ over the client's rows (the least-squares fit's normal equations). */
  gram(encoding: DigestEncoding): Promise<number[][]>;
  /** Round 2. */
  gradients(encoding: DigestEncoding, request: MeasurementRequest): Promise<GradientDigest>;
}

/**
 * A client whose rows are at hand (read by `readClientRows`, or any other source of a RawDataset,
 * such as a part of one large file): it answers every round from them. `close` ends its threads.
 */
export class LocalDigestClient implements DigestClientConnection {
  private encoded: { hash: string; passes: ClientPasses } | null = null;

  constructor(
    readonly name: string,
    private readonly raw: RawDataset<Float64Array | StoredMatrix>,
    private readonly options: Omit<SchemaDigestOptions, "client"> & {
      threads?: number;
      /** The memory limit the rows were read under; the encoded rows keep to it too. */
      memory?: MemorySettings;
    } = {},
  ) {}

  async schema(): Promise<SchemaDigest> {
    return computeSchemaDigest(this.raw, { ...this.options, client: this.name });
  }

  async evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums> {
    return this.encode(encoding).evaluate(request);
  }

  async gram(encoding: DigestEncoding): Promise<number[][]> {
    return this.encode(encoding).computeGramSum();
  }

  async gradients(encoding: DigestEncoding, request: MeasurementRequest): Promise<GradientDigest> {
    return computeGradientDigest(this.name, this.encode(encoding), encoding, request);
  }

  /** Ends the threads and gives back the scratch files: the client answers no more. */
  async close(): Promise<void> {
    await this.encoded?.passes.close();
    this.encoded = null;
    if (isStoredMatrix(this.raw.featureValues)) this.raw.featureValues.file.close();
  }

  /** The rows encoded with this encoding and shared with the pass threads (once per encoding). */
  private encode(encoding: DigestEncoding): ClientPasses {
    if (this.encoded?.hash !== encoding.hash) {
      void this.encoded?.passes.close();
      const passes = new ClientPasses(
        encodeClientRows(this.raw, encoding, this.options.memory),
        this.options.threads,
      );
      this.encoded = { hash: encoding.hash, passes };
    }
    return this.encoded.passes;
  }
}
