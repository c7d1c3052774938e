import "server-only";
import { findFederatedAnalysisById } from "@/db/queries/federated-analyses";
import {
  findFederatedDigest,
  findAnsweredExchanges,
  openExchange,
} from "@/db/queries/federated-digests";
import type { ExchangeKind } from "@/db/queries/federated-digests";
import {
  evaluationSumsSchema,
  gradientDigestSchema,
  hashDocument,
  type DigestClientConnection,
  type DigestEncoding,
  type EvaluationRequest,
  type EvaluationSums,
  type GradientDigest,
  type MeasurementRequest,
  type SchemaDigest,
} from "@/lib/analysis";
import type { Doorbell } from "@/lib/doorbell";

export interface StoredClientOptions {
  analysisId: string;
  client: { id: string; name: string };
  schema: SchemaDigest;
  /** The stored encoding: the coordinator's own merge must arrive at the same hash. */
  encodingHash: string;
  signal: AbortSignal;
  /** Rung on every answer of the client and every change of the analysis's state. */
  answers: Doorbell;
  /**
   * Longest wait without a ring before looking again, and between looks at whether the analysis
   * ended, round-2 files arrived or the client stayed silent too long.
   */
  lookAgainMs: number;
  /** How long a client may leave a question unanswered before the analysis fails. */
  silenceLimitMs: number;
  /**
   * For a reference that needs no fit: whether round-2 files have arrived. The fit is then set
   * aside (FitSetAsideError), as it is when a client stays silent through one of its questions.
   */
  filesArrived?: () => Promise<boolean>;
}

/** A client that stayed away longer than the analysis waits for it. */
export class ClientSilentError extends Error {
  constructor(client: string, minutes: number) {
    super(
      `client "${client}" did not answer the coordinator for ${minutes} minutes; start the analysis again when it can stay connected`,
    );
    this.name = "ClientSilentError";
  }
}

/** The fit was set aside: the analysis goes on with round 2 as files at its reference point. */
export class FitSetAsideError extends Error {
  constructor(client: string) {
    super(`the fit was set aside while waiting for client "${client}"`);
    this.name = "FitSetAsideError";
  }
}

/** The analysis ended while the coordinator waited (the analyst stopped it). */
export class AnalysisEndedError extends Error {
  constructor() {
    super("the analysis ended while the coordinator waited for its clients");
    this.name = "AnalysisEndedError";
  }
}

/**
 * The coordinator's side of one remote client (a DigestClientConnection over PostgreSQL): each
 * question is stored as an exchange, once (keyed by the request's hash), and answered by the
 * client through the API; the coordinator waits for the answer. An answer stored before — by this
 * coordinator or by one that stopped — is taken at once, so a retried job replays the fit without
 * asking anything twice, and a client that lost its connection finds the open question on return.
 */
export class StoredClientConnection implements DigestClientConnection {
  readonly name: string;

  constructor(private readonly options: StoredClientOptions) {
    this.name = options.client.name;
  }

  async schema(): Promise<SchemaDigest> {
    return this.options.schema;
  }

  async evaluate(encoding: DigestEncoding, request: EvaluationRequest): Promise<EvaluationSums> {
    return evaluationSumsSchema.parse(await this.ask(encoding, "evaluate", request));
  }

  async gram(encoding: DigestEncoding): Promise<number[][]> {
    return (await this.ask(encoding, "gram", { encodingHash: encoding.hash })) as number[][];
  }

  async gradients(encoding: DigestEncoding, request: MeasurementRequest): Promise<GradientDigest> {
    await this.ask(encoding, "gradients", request);
    const stored = await findFederatedDigest(this.options.client.id, "gradients");
    if (!stored) throw new Error(`client "${this.name}": its gradient digest is missing`);
    return gradientDigestSchema.parse(stored.document);
  }

  private async ask(encoding: DigestEncoding, kind: ExchangeKind, request: unknown) {
    const { analysisId, client, signal, answers, lookAgainMs, silenceLimitMs } = this.options;
    const filesArrived = kind === "gradients" ? undefined : this.options.filesArrived;
    if (encoding.hash !== this.options.encodingHash) {
      throw new Error("the coordinator's encoding differs from the one the clients were sent");
    }
    const exchange = await openExchange({
      federatedAnalysisId: analysisId,
      clientId: client.id,
      kind,
      requestKey: hashDocument(request),
      request,
    });
    if (exchange.answer !== null) return exchange.answer;
    const giveUpAt = Date.now() + silenceLimitMs;
    // The analysis's state is read only after a wait: a ring without the answer is a change of
    // state, and a timeout is when a lost notice, arrived files or silence would show.
    for (let waited = false; ; waited = true) {
      signal.throwIfAborted();
      const found = await findAnsweredExchanges([exchange.id]);
      if (found.has(exchange.id)) return found.get(exchange.id);
      if (waited) {
        const state = (await findFederatedAnalysisById(analysisId))?.state;
        if (state === undefined || state === "done" || state === "failed") {
          throw new AnalysisEndedError();
        }
        if (filesArrived && (await filesArrived())) throw new FitSetAsideError(client.name);
        if (Date.now() > giveUpAt) {
          if (filesArrived) throw new FitSetAsideError(client.name);
          throw new ClientSilentError(client.name, silenceLimitMs / 60_000);
        }
      }
      await answers.wait(Math.max(0, Math.min(lookAgainMs, giveUpAt - Date.now())), signal);
    }
  }
}
