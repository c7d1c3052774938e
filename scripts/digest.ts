/**
 * `npm run digest -- COMMAND …`: a federated analysis's rounds as files (methods.md §9), for
 * clients without a network path to a Partita server. Rows never leave the client's machine; the
 * files hold counts and sums.
 *   schema    --data FILE --label COL (--shard-column COL | --partition FILE | --shard NAME) … --out F
 *   encoding  SCHEMA.json… [--task T] [--min-rows N] --out encoding.json   (merges round 1)
 *   gradients --data … --encoding encoding.json --at zero|W.json --out F   (round 2)
 *   merge     --encoding encoding.json GRADIENTS.json… [plan flags as analyze] --out summary.json
 * Online, with a client key the analyst issued (no command):
 *   --server URL --key K --data FILE --label COL (--shard-column COL | --partition FILE | --shard NAME)
 *   sends round 1, waits for the encoding, answers the coordinator until the analysis ends.
 * Exit 0 on success, 2 on bad input (the message names the file, client and shard), 1 on an internal
 * error (stack only with DEBUG set).
 */
import path from "node:path";
import { parseArgs } from "node:util";
import {
  AnalysisInputError,
  ClientPasses,
  computeEncodingHash,
  computeGradientDigest,
  computeSchemaDigest,
  createMeasurementRequest,
  encodeClientRows,
  encodingSchema,
  gradientDigestSchema,
  mergeGradientDigests,
  mergeSchemaDigests,
  readClientRows,
  schemaDigestSchema,
  type DigestEncoding,
} from "../lib/analysis";
import {
  DATA_FLAGS,
  PLAN_FLAGS,
  readFeatures,
  readNumber,
  readPlanFlags,
  readReference,
  readTask,
  requireReadableFile,
} from "../lib/cli/analysis-flags";
import { createApiClient, ServerError } from "../lib/cli/api-client";
import { readDigestFile, writeJson } from "../lib/cli/digest-files";
import { FederatedAnalysisFailed, runOnlineClient } from "../lib/cli/digest-online";
import { EXIT_BAD_INPUT, runCommand } from "../lib/cli/run-command";
import { analysisOptionsSchema } from "../lib/validation/analysis-options";

const USAGE = `usage: npm run digest -- --server URL --key K DATA_FLAGS [--dry-run]
       npm run digest -- schema DATA_FLAGS [--client NAME] [--min-rows N] --out FILE
       npm run digest -- encoding SCHEMA.json… [--task classification|regression] [--min-rows N] --out FILE
       npm run digest -- gradients DATA_FLAGS --encoding FILE --at zero|W.json [--client NAME] --out FILE
       npm run digest -- merge --encoding FILE GRADIENTS.json… [--lambda X] [--participants M]
         [--local-steps K] [--rounds R] [--batch-size b] --out FILE
  DATA_FLAGS: --data FILE --label COL (--shard-column COL | --partition FILE | --shard NAME)
    [--id-column COL] [--features a,b,…] [--task classification|regression]`;

const text = { type: "string" } as const;
type Flags = Partial<Record<string, string>>;

async function main(): Promise<void> {
  const argv = process.argv.slice(2);
  if (argv[0]?.startsWith("--")) {
    const { flags, dryRun } = readFlags(argv);
    return runOnline(flags, dryRun);
  }
  const [command, ...rest] = argv;
  const { flags, files } = readFlags(rest);
  switch (command) {
    case "schema":
      return writeSchema(flags);
    case "encoding":
      return writeEncoding(flags, files);
    case "gradients":
      return writeGradients(flags);
    case "merge":
      return writeSummary(flags, files);
    default:
      throw new AnalysisInputError(`unknown command "${command ?? ""}"\n${USAGE}`);
  }
}

/** The online client: the key's analysis says the label and features; the rows never leave. */
async function runOnline(flags: Flags, dryRun: boolean): Promise<void> {
  const server = requireFlag(flags.server, "--server");
  const key = requireFlag(flags.key, "--key");
  await runOnlineClient({
    api: createApiClient(server, key),
    dryRun,
    print: (json) => process.stdout.write(json),
    log: (line) => process.stderr.write(`partita: ${line}\n`),
    readRows: async (assignment) => {
      if (flags.label !== undefined && flags.label !== assignment.labelColumn) {
        throw new AnalysisInputError(`--label is "${flags.label}"`, {
          expected: `the analysis's label column "${assignment.labelColumn}"`,
        });
      }
      return readRows({
        ...flags,
        label: assignment.labelColumn,
        features: flags.features ?? assignment.features?.join(","),
      });
    },
  });
}

async function writeSchema(flags: Flags): Promise<void> {
  const raw = await readRows(flags);
  const digest = computeSchemaDigest(raw, {
    client: clientName(flags),
    task: readTask(flags.task),
    minimumShardRows: readNumber(flags["min-rows"], "--min-rows"),
  });
  writeJson(flags.out, digest);
  process.stderr.write(
    `partita: schema digest of ${digest.shards.length} shards, ${raw.keptRows} rows\n`,
  );
}

function writeEncoding(flags: Flags, files: string[]): void {
  const digests = files.map((file) => readDigestFile(file, schemaDigestSchema, "schema digest"));
  const encoding = mergeSchemaDigests(digests, {
    task: readTask(flags.task),
    minimumShardRows: readNumber(flags["min-rows"], "--min-rows"),
  });
  writeJson(flags.out, encoding);
  process.stderr.write(
    `partita: encoding ${encoding.hash.slice(0, 12)}… of ${digests.length} clients, ${encoding.shardCount} shards, ${encoding.rows} rows\n`,
  );
}

async function writeGradients(flags: Flags): Promise<void> {
  const encoding = readEncoding(flags.encoding);
  const reference = readReference(requireFlag(flags.at, "--at"));
  if (reference === "optimum") {
    throw new AnalysisInputError("--at optimum needs the clients online for the fit", {
      expected: "--at zero or --at W.json (weights) for digests exchanged as files",
    });
  }
  const raw = await readRows(flags);
  const passes = new ClientPasses(encodeClientRows(raw, encoding));
  try {
    const request = createMeasurementRequest(encoding, reference ?? "zero", null);
    const digest = computeGradientDigest(clientName(flags), passes, encoding, request);
    writeJson(flags.out, digest);
    process.stderr.write(`partita: gradient digest of ${digest.shards.length} shards\n`);
  } finally {
    await passes.close();
  }
}

function writeSummary(flags: Flags, files: string[]): void {
  const encoding = readEncoding(flags.encoding);
  const digests = files.map((file) =>
    readDigestFile(file, gradientDigestSchema, "gradient digest"),
  );
  const plan = readPlanFlags(flags);
  // The analysis options' own defaults and checks (λ, K, R, b) hold here too.
  const options = analysisOptionsSchema.safeParse({ labelColumn: encoding.labelColumn, ...plan });
  if (!options.success) {
    const issue = options.error.issues[0];
    throw new AnalysisInputError(`option ${issue.path.join(".")}: ${issue.message}`);
  }
  const { lambda, participants, localSteps, rounds, batchSize } = options.data;
  const summary = mergeGradientDigests(encoding, digests, {
    lambda,
    plan: { participants, localSteps, rounds, batchSize },
  });
  writeJson(flags.out, summary);
  process.stderr.write(
    `partita: merged ${digests.length} clients, ${summary.shards.length} shards: ${summary.advice.verdict}\n`,
  );
}

function readEncoding(file: string | undefined): DigestEncoding {
  const path = requireFlag(file, "--encoding");
  const encoding = readDigestFile(path, encodingSchema, "encoding");
  if (computeEncodingHash(encoding) !== encoding.hash) {
    throw new AnalysisInputError("the encoding was changed after it was made (its hash differs)", {
      file: path,
      expected: "the encoding file as npm run digest -- encoding wrote it",
    });
  }
  return encoding;
}

async function readRows(flags: Flags) {
  const data = requireFlag(flags.data, "--data");
  const label = requireFlag(flags.label, "--label");
  requireReadableFile(data, "--data");
  if (flags.partition !== undefined) requireReadableFile(flags.partition, "--partition");
  return readClientRows({
    data: { path: data },
    dataName: data,
    partition: flags.partition ? { path: flags.partition } : undefined,
    partitionName: flags.partition,
    shard: flags.shard,
    columns: {
      labelColumn: label,
      idColumn: flags["id-column"],
      shardColumn: flags["shard-column"],
      features: readFeatures(flags.features),
    },
  });
}

/** The client's name on the roster and in messages: --client, else the data file's name. */
function clientName(flags: Flags): string {
  return flags.client ?? path.basename(requireFlag(flags.data, "--data")).replace(/\..*$/, "");
}

function requireFlag(value: string | undefined, flag: string): string {
  if (value === undefined) throw new AnalysisInputError(`${flag} is required\n${USAGE}`);
  return value;
}

function readFlags(argv: string[]): { flags: Flags; files: string[]; dryRun: boolean } {
  try {
    const { values, positionals } = parseArgs({
      args: argv,
      options: {
        ...DATA_FLAGS,
        ...PLAN_FLAGS,
        shard: text,
        client: text,
        "min-rows": text,
        encoding: text,
        at: text,
        out: text,
        server: text,
        key: text,
        "dry-run": { type: "boolean" },
      },
      strict: true,
      allowPositionals: true,
    });
    const { "dry-run": dryRun, ...flags } = values;
    return { flags: flags as Flags, files: positionals, dryRun: dryRun === true };
  } catch (error) {
    throw new AnalysisInputError(`${(error as Error).message}\n${USAGE}`);
  }
}

runCommand(main, (error) => {
  if (error instanceof ServerError) {
    return {
      line: `the server refused (${error.status}): ${error.message}`,
      exitCode: EXIT_BAD_INPUT,
    };
  }
  if (error instanceof FederatedAnalysisFailed) {
    return { line: `the analysis failed: ${error.message}`, exitCode: EXIT_BAD_INPUT };
  }
  return undefined;
});
