import { AnalysisInputError } from "@/lib/analysis";

/**
 * The AnalysisInputError `run` throws, for its message and fields; any other error is thrown on,
 * and a run that throws nothing fails the test with `accepted`, which names what was let through.
 */
export function inputErrorOf(run: () => unknown, accepted: string): AnalysisInputError {
  try {
    run();
  } catch (error) {
    if (error instanceof AnalysisInputError) return error;
    throw error;
  }
  throw new Error(accepted);
}
