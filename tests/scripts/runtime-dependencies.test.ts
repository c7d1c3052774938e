// A worker machine installs with `npm ci --omit=dev` (README, "Workers on other machines"), so every
// package the worker, its threads and the command lines load at run time must be a production
// dependency. esbuild follows the imports from each entry the way Node would (the react-server
// condition, the "@/" paths of tsconfig.json, type-only imports erased) and lists the packages it
// reaches. Threads start from their own .mjs entries (`new Worker(new URL(…))`, which no bundler
// follows), so every .mjs file under lib/ is an entry too.
import { readdirSync, readFileSync } from "node:fs";
import { builtinModules } from "node:module";
import path from "node:path";
import { build } from "esbuild";
import { describe, expect, it } from "vitest";

const projectRoot = path.resolve(import.meta.dirname, "../..");
const processEntries = [
  "scripts/worker.ts",
  "scripts/analyze.ts",
  "scripts/digest.ts",
  "scripts/layouts.ts",
];
const threadEntries = readdirSync(path.join(projectRoot, "lib"), {
  recursive: true,
  encoding: "utf8",
})
  .filter((file) => file.endsWith(".mjs"))
  .map((file) => path.join("lib", file));

/** "@aws-sdk/client-s3/dist/x" → "@aws-sdk/client-s3"; "pg" → "pg". */
function packageName(specifier: string): string {
  const parts = specifier.split("/");
  return specifier.startsWith("@") ? parts.slice(0, 2).join("/") : parts[0];
}

function isNodeBuiltin(specifier: string): boolean {
  return specifier.startsWith("node:") || builtinModules.includes(packageName(specifier));
}

/** Every bare package imported at run time by the code reachable from `entries`, with one importer each. */
async function packagesReachedFrom(entries: string[]): Promise<Map<string, string>> {
  const result = await build({
    absWorkingDir: projectRoot,
    entryPoints: entries,
    bundle: true,
    write: false,
    metafile: true,
    outdir: "unused",
    platform: "node",
    format: "esm",
    packages: "external",
    conditions: ["react-server"],
    tsconfig: "tsconfig.json",
    logLevel: "silent",
  });
  const reached = new Map<string, string>();
  for (const [importer, input] of Object.entries(result.metafile.inputs)) {
    for (const imported of input.imports) {
      if (!imported.external || isNodeBuiltin(imported.path)) continue;
      const name = packageName(imported.path);
      if (!reached.has(name)) reached.set(name, importer);
    }
  }
  return reached;
}

const manifest = JSON.parse(readFileSync(path.join(projectRoot, "package.json"), "utf8")) as {
  dependencies: Record<string, string>;
};

describe("what a worker install without development dependencies must hold", () => {
  it("finds the threads' entries beside the worker's", () => {
    expect(threadEntries).toEqual(
      expect.arrayContaining([
        path.join("lib", "analysis", "pass-thread-entry.mjs"),
        path.join("lib", "reports", "analysis-thread-entry.mjs"),
      ]),
    );
  });

  it("lists every package the worker, its threads and the command lines load as a production dependency", async () => {
    const reached = await packagesReachedFrom([...processEntries, ...threadEntries]);
    // The trace must see the packages these entries are known to load, or an empty result would pass.
    expect([...reached.keys()]).toEqual(
      expect.arrayContaining(["pg-boss", "drizzle-orm", "tsx", "papaparse"]),
    );
    const missing = [...reached]
      .filter(([name]) => !(name in manifest.dependencies))
      .map(([name, importer]) => `${name} (imported by ${importer})`);
    expect(missing).toEqual([]);
  });
});
