import { execFileSync } from "node:child_process";

/**
 * Debian's python3 with NumPy, SciPy, pandas and scikit-learn (python3-sklearn). The `python3`
 * first on PATH on this machine lacks them, so the path is explicit.
 */
export const REFERENCE_PYTHON = "/usr/bin/python3";

/**
 * Runs a Python program with `/usr/bin/python3`, passes `input` as JSON on stdin and returns the JSON
 * the program prints. Used to compute reference values live with an outside library.
 */
export function runPythonJson<Result>(program: string, input: unknown = null): Result {
  const output = execFileSync(REFERENCE_PYTHON, ["-c", program], {
    input: JSON.stringify(input),
    encoding: "utf8",
    maxBuffer: 512 * 1024 * 1024,
  });
  return JSON.parse(output) as Result;
}
