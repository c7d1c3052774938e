// The OpenAPI description is checked against the official OpenAPI 3.1 JSON Schema by
// @seriousme/openapi-schema-validator (an outside package), and against the route handlers that
// actually exist under app/api/v1, found on disk, so a route added without documentation fails.
import { readdirSync, statSync } from "node:fs";
import path from "node:path";
import { Validator } from "@seriousme/openapi-schema-validator";
import { describe, expect, it } from "vitest";
import { GET as getDocument } from "@/app/api/v1/openapi.json/route";

const API_ROOT = path.resolve(import.meta.dirname, "../../../app/api/v1");
const HTTP_METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;

/** Every route file under app/api/v1 as its URL template, e.g. /api/v1/reports/{reportId}. */
function findRouteFiles(directory = API_ROOT): { template: string; file: string }[] {
  return readdirSync(directory).flatMap((entry) => {
    const full = path.join(directory, entry);
    if (statSync(full).isDirectory()) return findRouteFiles(full);
    if (entry !== "route.ts") return [];
    const segments = path.relative(API_ROOT, directory).split(path.sep).filter(Boolean);
    // A catch-all only answers unknown paths with a JSON 404; it is not part of the API.
    if (segments.some((segment) => segment.startsWith("[..."))) return [];
    const template = segments.map((segment) => segment.replace(/^\[(.+)\]$/, "{$1}")).join("/");
    return [{ template: `/api/v1${template ? `/${template}` : ""}`, file: full }];
  });
}

async function loadDocument() {
  const response = getDocument();
  expect(response.status).toBe(200);
  return (await response.json()) as {
    openapi: string;
    paths: Record<string, Record<string, { responses: Record<string, unknown> }>>;
  };
}

describe("GET /api/v1/openapi.json", () => {
  it("is a valid OpenAPI 3.1 document", async () => {
    const document = await loadDocument();
    expect(document.openapi).toBe("3.1.0");
    const result = await new Validator().validate(document);
    expect(result.errors ?? []).toEqual([]);
    expect(result.valid).toBe(true);
    // The validator is not a rubber stamp: the same document without its info object fails.
    const withoutInfo: Record<string, unknown> = structuredClone(document);
    delete withoutInfo.info;
    expect((await new Validator().validate(withoutInfo)).valid).toBe(false);
  });

  it("lists every route handler under app/api/v1 with exactly its methods", async () => {
    const document = await loadDocument();
    const routes = findRouteFiles();
    expect(routes.length).toBeGreaterThanOrEqual(11);
    const onDisk: Record<string, string[]> = {};
    for (const { template, file } of routes) {
      const handlers = (await import(file)) as Record<string, unknown>;
      onDisk[template] = HTTP_METHODS.filter((method) => typeof handlers[method] === "function")
        .map((method) => method.toLowerCase())
        .sort();
    }
    const documented = Object.fromEntries(
      Object.entries(document.paths).map(([template, item]) => [
        template,
        Object.keys(item).sort(),
      ]),
    );
    expect(documented).toEqual(onDisk);
  });

  it("documents the error answers every token-protected operation can give", async () => {
    const document = await loadDocument();
    for (const [template, item] of Object.entries(document.paths)) {
      if (template === "/api/v1/openapi.json") continue;
      for (const operation of Object.values(item)) {
        expect(Object.keys(operation.responses)).toEqual(expect.arrayContaining(["401", "429"]));
      }
    }
  });
});
