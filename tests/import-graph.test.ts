// The project's imports run one way (DEVELOPERS.md, "Where things live"): no module imports itself
// back through others, type-only imports included, code outside the engine reaches it only
// through its two entries, and nothing below the routes imports from app/. The graph comes from TypeScript's own import scanner over the source
// folders; "@/" and relative paths are resolved as tsconfig.json maps them.
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

const projectRoot = path.resolve(import.meta.dirname, "..");
const SOURCE_FOLDERS = ["app", "components", "lib", "db", "scripts"];
const ENGINE_ENTRIES = ["lib/analysis/index.ts", "lib/analysis/browser.ts"];
/**
 * Outside lib/analysis but below its entries: the engine parses its options with this schema, so
 * the schema names the one engine module it needs (text-format.ts) instead of an entry that leads
 * back to the engine.
 */
const ENGINE_DEPENDENCIES = ["lib/validation/analysis-options.ts"];

function listSourceFiles(): string[] {
  const inFolders = SOURCE_FOLDERS.flatMap((folder) =>
    readdirSync(path.join(projectRoot, folder), { recursive: true, encoding: "utf8" })
      .filter((file) => /\.(ts|tsx|mts|mjs)$/.test(file) && !file.endsWith(".d.ts"))
      .map((file) => path.posix.join(folder, file.split(path.sep).join("/"))),
  );
  return [...inFolders, "proxy.ts"];
}

/** The project file an import names, or null for a package or a file outside the source folders. */
function resolveImport(importer: string, specifier: string, files: Set<string>): string | null {
  let base: string;
  if (specifier.startsWith("@/")) base = specifier.slice(2);
  else if (specifier.startsWith("."))
    base = path.posix.join(path.posix.dirname(importer), specifier);
  else return null;
  const candidates = [base, `${base}.ts`, `${base}.tsx`, `${base}/index.ts`, `${base}/index.tsx`];
  return candidates.find((candidate) => files.has(candidate)) ?? null;
}

type ImportGraph = Map<string, string[]>;

function readImportGraph(): ImportGraph {
  const files = listSourceFiles();
  const known = new Set(files);
  const graph: ImportGraph = new Map();
  for (const file of files) {
    const source = readFileSync(path.join(projectRoot, file), "utf8");
    const { importedFiles } = ts.preProcessFile(source, true, true);
    const targets = importedFiles
      .map(({ fileName }) => resolveImport(file, fileName, known))
      .filter((target): target is string => target !== null);
    graph.set(file, targets);
  }
  return graph;
}

/** Strongly connected groups of more than one file (Tarjan's algorithm), each sorted. */
function findImportCycles(graph: ImportGraph): string[][] {
  const order = new Map<string, number>();
  const lowest = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const cycles: string[][] = [];
  const visit = (file: string) => {
    order.set(file, order.size);
    lowest.set(file, order.get(file)!);
    stack.push(file);
    onStack.add(file);
    for (const target of graph.get(file) ?? []) {
      if (!order.has(target)) {
        visit(target);
        lowest.set(file, Math.min(lowest.get(file)!, lowest.get(target)!));
      } else if (onStack.has(target)) {
        lowest.set(file, Math.min(lowest.get(file)!, order.get(target)!));
      }
    }
    if (lowest.get(file) !== order.get(file)) return;
    const group: string[] = [];
    let member: string;
    do {
      member = stack.pop()!;
      onStack.delete(member);
      group.push(member);
    } while (member !== file);
    if (group.length > 1 || graph.get(file)?.includes(file)) cycles.push(group.sort());
  };
  for (const file of graph.keys()) if (!order.has(file)) visit(file);
  return cycles;
}

describe("the import graph", () => {
  const graph = readImportGraph();

  it("is read from the source folders", () => {
    // The scanner must see known edges, or an empty graph would pass every check below.
    expect(graph.get("scripts/worker.ts")).toContain("lib/reports/run-analysis.ts");
    expect(graph.get("lib/analysis/index.ts")).toContain("lib/analysis/browser.ts");
  });

  it("finds a cycle when there is one (a small graph stated here)", () => {
    const withCycle: ImportGraph = new Map([
      ["a.ts", ["b.ts"]],
      ["b.ts", ["c.ts"]],
      ["c.ts", ["a.ts", "d.ts"]],
      ["d.ts", []],
    ]);
    expect(findImportCycles(withCycle)).toEqual([["a.ts", "b.ts", "c.ts"]]);
    expect(
      findImportCycles(
        new Map([
          ["a.ts", ["b.ts"]],
          ["b.ts", []],
        ]),
      ),
    ).toEqual([]);
  });

  it("has no cycles", () => {
    expect(findImportCycles(graph)).toEqual([]);
  });

  it("reaches the engine from outside only through index.ts or browser.ts", () => {
    const pastTheEntries = [...graph].flatMap(([file, targets]) =>
      file.startsWith("lib/analysis/") || ENGINE_DEPENDENCIES.includes(file)
        ? []
        : targets
            .filter((target) => target.startsWith("lib/analysis/"))
            .filter((target) => !ENGINE_ENTRIES.includes(target))
            .map((target) => `${file} → ${target}`),
    );
    expect(pastTheEntries).toEqual([]);
  });

  it("never leads from components, lib or db back into app/", () => {
    // Routes hand their server actions to components as props (style.md 13).
    const intoApp = [...graph].flatMap(([file, targets]) =>
      /^(components|lib|db)\//.test(file)
        ? targets
            .filter((target) => target.startsWith("app/"))
            .map((target) => `${file} → ${target}`)
        : [],
    );
    expect(intoApp).toEqual([]);
  });
});
