import { AnalysisInputError } from "../analysis";

/** The command lines' exit codes besides 0: a fault of Partita's, and input it cannot use. */
export const EXIT_INTERNAL = 1;
export const EXIT_BAD_INPUT = 2;

/** A failure the user can act on: the line printed after "partita: " and the exit code. */
export interface KnownFailure {
  line: string;
  exitCode: number;
}

/**
 * Runs a command line's `main` and sets the process's exit code from it: its answer (0 when it
 * answers nothing); for a failure, the line and code `describeFailure` gives, bad input for an
 * AnalysisInputError, and otherwise an internal error, whose stack is printed only with DEBUG set.
 * Sets exitCode instead of calling process.exit(): exiting at once would cut off output still
 * queued for a pipe.
 */
export function runCommand(
  main: () => Promise<number | void>,
  describeFailure: (error: unknown) => KnownFailure | undefined = () => undefined,
): void {
  main().then(
    (exitCode) => {
      process.exitCode = exitCode ?? 0;
    },
    (error: unknown) => {
      const known =
        describeFailure(error) ??
        (error instanceof AnalysisInputError
          ? { line: `bad input: ${error.message}`, exitCode: EXIT_BAD_INPUT }
          : undefined);
      if (known) {
        process.stderr.write(`partita: ${known.line}\n`);
        process.exitCode = known.exitCode;
        return;
      }
      const message = error instanceof Error ? error.message : String(error);
      process.stderr.write(`partita: internal error: ${message}\n`);
      if (process.env.DEBUG && error instanceof Error) process.stderr.write(`${error.stack}\n`);
      process.exitCode = EXIT_INTERNAL;
    },
  );
}
