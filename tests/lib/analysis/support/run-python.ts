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

/**
 * Where CPython's strict UTF-8 decoder first fails in each byte sequence (UnicodeDecodeError's
 * `start`), or the sequence's length when it decodes: the outside reference for invalid UTF-8.
 */
export function pythonUtf8ErrorStarts(cases: number[][]): number[] {
  return runPythonJson<number[]>(
    `import sys, json
out = []
for case in json.load(sys.stdin):
    try:
        bytes(case).decode("utf-8"); out.append(len(case))
    except UnicodeDecodeError as error:
        out.append(error.start)
print(json.dumps(out))`,
    cases,
  );
}
