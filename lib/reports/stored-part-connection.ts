import {
  findPartAnswer,
  findPartState,
  listRunParts,
  openPartExchange,
  type PartExchangeKind,
} from "@/db/queries/analysis-parts";
import {
  evaluationSumsSchema,
  gradientDigestSchema,
  hashDocument,
  schemaDigestSchema,
  type DigestClientConnection,
  type DigestEncoding,
  type EvaluationRequest,
  type EvaluationSums,
  type GradientDigest,
  type MeasurementRequest,
  type SchemaDigest,
} from "@/lib/analysis";
import type { Doorbell } from "@/lib/doorbell";

export interface StoredPartOptions {
  analysisId: string;
  runId: string;
  partIndex: number;
  partCount: number;
  signal: AbortSignal;
  /** Rung on every answer of the part and every change of its run (db listenToPart). */
  answers: Doorbell;
  /**
   * Longest wait without a ring before looking again, and between looks at whether the part failed
   * or the run ended without a notification (a cancelled analysis, a lost notification).
   */
  lookAgainMs: number;
}

/** The analysis stopped running (cancelled) or a newer run replaced this one while it waited. */
export class PartRunEndedError extends Error {
  constructor() {
    super("the analysis's run in parts ended while its coordinator waited for a part");
    this.name = "PartRunEndedError";
  }
}

/** A part could not be read (bad input) or failed on every try: the analysis ends with its message. */
export class PartFailedError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PartFailedError";
  }
}

/**
 * The coordinator's side of one part of an analysis shared by several workers (a
 * DigestClientConnection over PostgreSQL): round 1 is the digest the part's job stored, every
 * later question is stored once (keyed by the request's hash) and answered by whichever worker
 * holds the part — or, after that worker stopped, by the one that took the part over, which finds
 * the same open question. The coordinator only waits; it never needs to know who answered.
 */
export class StoredPartConnection implements DigestClientConnection {
  readonly name: string;

  constructor(private readonly options: StoredPartOptions) {
    this.name = `part ${options.partIndex + 1} of ${options.partCount}`;
  }

  async schema(): Promise<SchemaDigest> {
    const { analysisId, runId, partIndex } = this.options;
    return schemaDigestSchema.parse(
      await this.waitFor(async () => {
        const parts = await listRunParts(analysisId, runId);
        return parts.find((part) => part.partIndex === partIndex)?.schemaDigest ?? null;
      }),
    );
  }

  async evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums> {
    return evaluationSumsSchema.parse(await this.ask("evaluate", { encoding, request }));
  }

  async gram(encoding: DigestEncoding): Promise<number[][]> {
    return (await this.ask("gram", { encoding })) as number[][];
  }

  async gradients(encoding: DigestEncoding, request: MeasurementRequest): Promise<GradientDigest> {
    return gradientDigestSchema.parse(await this.ask("gradients", { encoding, request }));
  }

  private async ask(kind: PartExchangeKind, request: unknown): Promise<unknown> {
    const { analysisId, runId, partIndex } = this.options;
    const exchange = await openPartExchange({
      analysisId,
      runId,
      partIndex,
      kind,
      requestKey: hashDocument(request),
      request,
    });
    if (exchange.answer !== null) return exchange.answer;
    return this.waitFor(() => findPartAnswer(exchange.id));
  }

  /**
   * Looks until `look` finds something, woken by the part's notifications; the part's state is read
   * only after a wait (a ring without the answer is a failure or the run's end, or a timeout).
   */
  private async waitFor(look: () => Promise<unknown>): Promise<unknown> {
    const { analysisId, runId, signal, answers, lookAgainMs } = this.options;
    for (let waited = false; ; waited = true) {
      signal.throwIfAborted();
      const found = await look();
      if (found !== null) return found;
      if (waited) {
        const state = await findPartState(analysisId, runId, this.options.partIndex);
        if (state.failureMessage !== null) throw new PartFailedError(state.failureMessage);
        if (!state.live) throw new PartRunEndedError();
      }
      await answers.wait(lookAgainMs, signal);
    }
  }
}
