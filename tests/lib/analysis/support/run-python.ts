import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";

/**
 * Debian's python3 with NumPy, SciPy, pandas and scikit-learn (python3-sklearn). The `python3`
 * first on PATH on this machine lacks them, so the path is explicit.
 */
export const REFERENCE_PYTHON = "/usr/bin/python3";

/**
 * Methods.md §1's token rules in Python, for reference programs that read a CSV as text (they
 * import math): `missing(token)` for the missing-value tokens (trimmed, any case) and `number(token)`
 * for a finite number by Python's float(), None otherwise.
 */
export const PYTHON_TOKEN_RULES = `MISSING = {"", "na", "n/a", "nan", "null", "none"}
def missing(token): return token.strip().lower() in MISSING
def number(token):
    try:
        value = float(token)
    except ValueError:
        return None
    return value if math.isfinite(value) else None
`;

/**
 * Runs a Python program with `/usr/bin/python3`, passes `input` as JSON on stdin and returns the JSON
 * the program prints. Used to compute reference values live with an outside library.
 */
export function runPythonJson<Result>(program: string, input: unknown = null): Result {
  const text = JSON.stringify(input);
  const kept = keptReferencePath(program, text);
  if (kept !== null && existsSync(kept)) return JSON.parse(readFileSync(kept, "utf8")) as Result;
  const output = execFileSync(REFERENCE_PYTHON, ["-c", program], {
    input: text,
    encoding: "utf8",
    maxBuffer: 512 * 1024 * 1024,
  });
  if (kept !== null) {
    mkdirSync(path.dirname(kept), { recursive: true });
    writeFileSync(kept, output);
  }
  return JSON.parse(output) as Result;
}

/**
 * Where a reference is kept when PARTITA_REFERENCE_DIR names a folder (the mutation runs set it,
 * vitest.mutation.config.mts): a mutant changes the code under test, not a reference's program or
 * input, so each reference is computed once per scoring run instead of once per mutant. Keyed by
 * the program and the whole input, so a different question never gets a kept answer.
 */
function keptReferencePath(program: string, input: string): string | null {
  const folder = process.env.PARTITA_REFERENCE_DIR;
  if (!folder) return null;
  const key = createHash("sha256").update(program).update("\0").update(input).digest("hex");
  return path.join(folder, `${key}.json`);
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
