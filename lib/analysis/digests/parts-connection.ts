import type { Task } from "../design";
import {
  combineEvaluationSums,
  combineGradientDigests,
  combineSchemaDigests,
} from "./combine-parts";
import type {
  DigestEncoding,
  EvaluationRequest,
  EvaluationSums,
  GradientDigest,
  MeasurementRequest,
  SchemaDigest,
} from "./digest-format";
import type { DigestClientConnection } from "./local-client";

/**
 * One dataset analysed in parts (methods.md §9's machinery, one client made of several): each part
 * is a connection of its own — in this process, or a job any worker takes — and every round's
 * answers are combined shard by shard (combine-parts.ts), so the coordinator sees the dataset as
 * one client whose digests are the whole file's. Parts are in file order; a shard may span several.
 */
export class PartsConnection implements DigestClientConnection {
  /** Per part, the rows of each of its shards (from round 1), to place the fit's subsample. */
  private shardRowsOfParts: Map<string, number>[] | null = null;

  constructor(
    readonly name: string,
    private readonly parts: DigestClientConnection[],
    private readonly task?: Task,
  ) {}

  async schema(): Promise<SchemaDigest> {
    const pending = this.parts.map((part) => part.schema());
    // A failure is reported in file order, as a one-process read meets the first bad row: a part's
    // failure waits for the parts before it (each is awaited in turn; none is left unobserved).
    for (const digest of pending) digest.catch(() => undefined);
    const digests: SchemaDigest[] = [];
    for (const digest of pending) digests.push(await digest);
    this.shardRowsOfParts = digests.map(
      (digest) => new Map(digest.shards.map((shard) => [shard.id, shard.rows])),
    );
    return combineSchemaDigests(this.name, digests, this.task);
  }

  async evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums> {
    const answers = await Promise.all(
      this.parts.map((part, index) => part.evaluate(encoding, this.placePart(request, index))),
    );
    return combineEvaluationSums(answers);
  }

  async gram(encoding: DigestEncoding): Promise<number[][]> {
    const grams = await Promise.all(this.parts.map((part) => part.gram(encoding)));
    return grams[0].map((row, j) =>
      row.map((_, k) => grams.reduce((total, gram) => total + gram[j][k], 0)),
    );
  }

  async gradients(encoding: DigestEncoding, request: MeasurementRequest): Promise<GradientDigest> {
    const digests = await Promise.all(this.parts.map((part) => part.gradients(encoding, request)));
    return combineGradientDigests(this.name, digests);
  }

  /**
   * The request as part `index` must see it: the subsample takes global row g of the shard-ordered
   * rows when g is a multiple of the stride, and a shard's rows in this part follow its rows in the
   * parts before (rows keep their file order within a shard), so the part's shards start that many
   * rows later.
   */
  private placePart(request: EvaluationRequest, index: number): EvaluationRequest {
    if (request.sample === null) return request;
    const rowsOfParts = this.shardRowsOfParts;
    if (rowsOfParts === null) throw new Error("an evaluation was asked before round 1");
    const shardStarts: Record<string, number> = {};
    for (const id of rowsOfParts[index].keys()) {
      let start = request.sample.shardStarts[id] ?? 0;
      for (let before = 0; before < index; before++) start += rowsOfParts[before].get(id) ?? 0;
      shardStarts[id] = start;
    }
    return { ...request, sample: { ...request.sample, shardStarts } };
  }
}
