// Uploads end to end against the S3 fake (s3rver) and PostgreSQL that `npm test` starts: the route
// handlers hand out presigned URLs, the test PUTs bytes to them as a browser would, and
// registerDataFile checks the object and stores its preview. Open data: the penguins table of the
// `vega-datasets` npm package (BSD-3), whose documented columns are 3 species, 3 islands, four
// numeric body measurements and sex.
import { randomUUID } from "node:crypto";
import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

import { createHash } from "node:crypto";
import {
  deleteDataFile,
  previewDatasetAs,
  registerDataFile,
} from "@/app/(workspace)/w/[workspaceId]/analyses/new/actions";
import { POST as createUpload } from "@/app/api/workspaces/[workspaceId]/uploads/route";
import { POST as abortUpload } from "@/app/api/workspaces/[workspaceId]/uploads/multipart/abort/route";
import { POST as completeUpload } from "@/app/api/workspaces/[workspaceId]/uploads/multipart/complete/route";
import { POST as signParts } from "@/app/api/workspaces/[workspaceId]/uploads/multipart/parts/route";
import { closeDb } from "@/db/client";
import { insertAnalysis } from "@/db/queries/analyses";
import { findDataFile, listDataFiles } from "@/db/queries/data-files";
import { headObject, putObject } from "@/lib/storage";
import {
  buildUploadKey,
  MULTIPART_PART_BYTES,
  SINGLE_PUT_MAX_BYTES,
} from "@/lib/uploads/file-rules";
import { startAnalysisSchema } from "@/lib/validation/start-analysis";
import type { UploadTicket } from "@/lib/validation/upload";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, storePenguins } from "@/tests/lib/reports/support/stored-inputs";

afterAll(closeDb);

type Handler = (
  request: Request,
  context: { params: Promise<{ workspaceId: string }> },
) => Promise<Response>;

/** Calls a route handler the way Next does, with a JSON body. */
function call(handler: Handler, workspaceId: string, body: unknown): Promise<Response> {
  const request = new Request(`http://127.0.0.1/api/workspaces/${workspaceId}/uploads`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  return handler(request, { params: Promise.resolve({ workspaceId }) });
}

async function errorOf(response: Response): Promise<{ status: number; message: string }> {
  const body = (await response.json()) as { error: { message: string } };
  return { status: response.status, message: body.error.message };
}

const { csv: penguinsCsv, islandMap } = loadPenguinsCsv();
const newKey = (workspaceId: string, name: string) =>
  buildUploadKey(workspaceId, name, randomUUID());

describe("a presigned PUT, then registration", () => {
  it("uploads the penguins CSV, registers it and stores a preview with the documented types", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const body = Buffer.from(penguinsCsv);
    const response = await call(createUpload, team.workspaceId, {
      name: "penguins.csv",
      size: body.length,
      kind: "dataset",
      contentType: "application/vnd.ms-excel",
    });
    expect(response.status).toBe(201);
    const ticket = (await response.json()) as UploadTicket;
    if (ticket.method !== "single") throw new Error("a small file goes in one PUT");
    expect(ticket.key).toMatch(
      new RegExp(`^workspaces/${team.workspaceId}/files/[0-9a-f-]{36}/penguins\\.csv$`),
    );
    const url = new URL(ticket.url);
    expect(decodeURIComponent(url.pathname).endsWith(ticket.key)).toBe(true);
    expect(Number(url.searchParams.get("X-Amz-Expires"))).toBeLessThanOrEqual(900);
    // The signed content type is the server's choice, not the browser's guess.
    expect(ticket.headers).toEqual({ "content-type": "text/csv" });

    const put = await fetch(ticket.url, { method: "PUT", body, headers: ticket.headers });
    expect(put.status).toBe(200);

    const result = await registerDataFile(team.workspaceId, {
      key: ticket.key,
      name: "penguins.csv",
      kind: "dataset",
    });
    if (!result.ok) throw new Error(result.message);
    const file = result.data;
    expect(file).toMatchObject({ kind: "dataset", name: "penguins.csv", sizeBytes: body.length });
    expect(file.preview?.truncated).toBe(false);
    expect(
      file.preview?.columns.map((column) => [column.name, column.type, column.distinct]),
    ).toEqual([
      ["row", "numeric", 344],
      ["Species", "categorical", 3],
      ["Island", "categorical", 3],
      ["Beak Length (mm)", "numeric", expect.any(Number)],
      ["Beak Depth (mm)", "numeric", expect.any(Number)],
      ["Flipper Length (mm)", "numeric", expect.any(Number)],
      ["Body Mass (g)", "numeric", expect.any(Number)],
      ["Sex", "categorical", expect.any(Number)],
    ]);
    expect(file.preview?.rows[0]).toEqual(penguinsCsv.split("\n")[1].split(","));
    expect(file.preview?.rows).toHaveLength(20);

    // Stored in the workspace, newest first, and nowhere else.
    const listed = await listDataFiles(team.workspaceId, "dataset");
    expect(listed[0].id).toBe(file.id);
    expect(await listDataFiles(team.workspaceId, "layout")).toEqual([]);
    expect((await findDataFile(team.workspaceId, file.id))?.objectKey).toBe(ticket.key);
    expect(await findDataFile(team.analyst.workspaceId, file.id)).toBeUndefined();

    // Registering the same object again (a retried request) returns the same registration.
    const again = await registerDataFile(team.workspaceId, {
      key: ticket.key,
      name: "penguins.csv",
      kind: "dataset",
    });
    expect(again.ok && again.data.id).toBe(file.id);
  });

  it("registers a partition map and reference weights put through lib/storage", async () => {
    const team = await createTeam();
    actAs(team.owner);
    const mapKey = newKey(team.workspaceId, "islands.csv");
    await putObject({ key: mapKey, body: islandMap, contentType: "text/csv" });
    const layout = await registerDataFile(team.workspaceId, {
      key: mapKey,
      name: "islands.csv",
      kind: "layout",
    });
    expect(layout.ok && layout.data.preview?.columns).toEqual([
      { name: "row_id", type: "numeric", distinct: 344 },
      { name: "shard", type: "categorical", distinct: 3 },
    ]);

    const weightsKey = newKey(team.workspaceId, "weights.json");
    await putObject({
      key: weightsKey,
      body: JSON.stringify({ classes: null, features: ["x"], weights: [[0.5, -1]] }),
      contentType: "application/json",
    });
    const weights = await registerDataFile(team.workspaceId, {
      key: weightsKey,
      name: "weights.json",
      kind: "weights",
    });
    expect(weights.ok && weights.data.preview?.rows).toEqual([["(target)", "0.5", "-1"]]);
  });
});

describe("reading options: detected at registration, chosen on the form (methods.md §1)", () => {
  it("stores the detected encoding, delimiter and decimal mark, and re-reads in the chosen ones", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    // A spreadsheet's Windows "CSV": Windows-1252 bytes, semicolons, decimal commas.
    const text = "city;x;label\nZürich;1,5;a\nGenève;2,25;b\nMünchen;0,5;a\n";
    const key = newKey(team.workspaceId, "cities.csv");
    await putObject({ key, body: Buffer.from(text, "latin1"), contentType: "text/csv" });
    const registered = await registerDataFile(team.workspaceId, {
      key,
      name: "cities.csv",
      kind: "dataset",
    });
    if (!registered.ok) throw new Error(registered.message);
    expect(registered.data.preview?.format).toEqual({
      encoding: "windows-1252",
      delimiter: ";",
      decimalMark: ",",
    });
    expect(registered.data.preview?.rows[0]).toEqual(["Zürich", "1,5", "a"]);
    const fileId = registered.data.id;

    // A decimal point chosen: "1,5" is no number, so x is a text column in the re-read preview.
    const byPoint = await previewDatasetAs(team.workspaceId, fileId, {
      encoding: "windows-1252",
      decimalMark: ".",
    });
    expect(byPoint.ok && byPoint.data.columns.map((column) => column.type)).toEqual([
      "categorical",
      "categorical",
      "categorical",
    ]);
    // UTF-8 chosen: refused with the engine's words, the stored preview untouched.
    const asUtf8 = await previewDatasetAs(team.workspaceId, fileId, { encoding: "utf-8" });
    expect(!asUtf8.ok && asUtf8.message).toBe(
      "cities.csv: the text is not valid UTF-8 (expected UTF-8 text, or the file's encoding chosen (windows-1252, utf-16))",
    );
    expect((await findDataFile(team.workspaceId, fileId))?.preview?.columns[1].type).toBe(
      "numeric",
    );
    // A value outside the choices is a field error, not a read.
    const odd = await previewDatasetAs(team.workspaceId, fileId, {
      delimiter: "|" as ";",
    });
    expect(!odd.ok && odd.status).toBe(422);
  });
});

describe("the same bytes again, and deleting what no analysis reads", () => {
  const putAndRegister = async (workspaceId: string, name: string, body: string) => {
    const key = newKey(workspaceId, name);
    await putObject({ key, body, contentType: "text/csv" });
    const result = await registerDataFile(workspaceId, { key, name, kind: "dataset" });
    if (!result.ok) throw new Error(result.message);
    return { key, file: result.data };
  };

  it("reuses the file already holding the same bytes and removes the new copy", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const first = await putAndRegister(team.workspaceId, "penguins.csv", penguinsCsv);
    // The SHA-256 of the bytes, by Node's own hash (an outside computation of the same digest).
    expect(first.file).toMatchObject({
      reused: false,
      analysisCount: 0,
      sha256: createHash("sha256").update(penguinsCsv).digest("hex"),
    });
    const names = ["penguins (1).csv", "penguins copy.csv", "penguins.csv"];
    for (const name of names) {
      const again = await putAndRegister(team.workspaceId, name, penguinsCsv);
      expect(again.file).toMatchObject({ id: first.file.id, name: "penguins.csv", reused: true });
      expect(await headObject(again.key)).toBeUndefined();
    }
    // One byte more is another file.
    const other = await putAndRegister(team.workspaceId, "penguins.csv", `${penguinsCsv}\n`);
    expect(other.file).toMatchObject({ reused: false });
    expect(other.file.id).not.toBe(first.file.id);
    expect((await listDataFiles(team.workspaceId, "dataset")).map((file) => file.id)).toEqual([
      other.file.id,
      first.file.id,
    ]);
    // Another workspace with the same bytes gets its own file: nothing is shared across them.
    const stranger = await createAccount("stranger");
    actAs(stranger);
    const theirs = await putAndRegister(stranger.workspaceId, "penguins.csv", penguinsCsv);
    expect(theirs.file).toMatchObject({ reused: false });
    expect(theirs.file.id).not.toBe(first.file.id);
  });

  it("deletes an upload no analysis reads, from storage too, and keeps one an analysis reads", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const unused = await putAndRegister(team.workspaceId, "draft.csv", "a,b\n1,2\n3,4\n");
    const files = await storePenguins({
      workspaceId: team.workspaceId,
      uploadedBy: team.analyst.id,
    });
    // An analysis as starting one records it (the queue is not needed to read its inputs).
    const request = startAnalysisSchema.parse({
      datasetFileId: files.dataset.id,
      layoutFileId: files.layout.id,
      options: PENGUIN_OPTIONS,
    });
    await insertAnalysis(team.workspaceId, team.analyst.id, { ...request, title: "Penguins" });
    expect((await findDataFile(team.workspaceId, files.dataset.id))?.analysisCount).toBe(1);

    actAs(team.reviewer);
    expect(await deleteDataFile(team.workspaceId, unused.file.id)).toMatchObject({ status: 403 });
    actAs(team.analyst);
    expect(await deleteDataFile(team.workspaceId, files.layout.id)).toMatchObject({
      ok: false,
      status: 409,
      message: '"islands.csv" is an input of an analysis; it stays while their reports do.',
    });
    expect(await findDataFile(team.workspaceId, files.layout.id)).toBeDefined();
    expect(await deleteDataFile(team.workspaceId, unused.file.id)).toEqual({
      ok: true,
      data: undefined,
    });
    expect(await findDataFile(team.workspaceId, unused.file.id)).toBeUndefined();
    expect(await headObject(unused.key)).toBeUndefined();
    expect(await deleteDataFile(team.workspaceId, unused.file.id)).toMatchObject({ status: 404 });
  });
});

describe("a multipart upload, then registration", () => {
  it("creates the upload, PUTs the parts with fetch, completes it and previews its beginning only", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    // Just over the single-PUT limit: the penguins rows repeated.
    const [header, ...rows] = penguinsCsv.trim().split("\n");
    const block = `${rows.join("\n")}\n`;
    const copies = Math.ceil((SINGLE_PUT_MAX_BYTES + 1) / block.length);
    const body = Buffer.from(`${header}\n${block.repeat(copies)}`);
    const response = await call(createUpload, team.workspaceId, {
      name: "many penguins.csv",
      size: body.length,
      kind: "dataset",
      contentType: "text/csv",
    });
    expect(response.status).toBe(201);
    const ticket = (await response.json()) as UploadTicket;
    if (ticket.method !== "multipart") throw new Error("a large file goes in parts");
    expect(ticket.partSize).toBe(MULTIPART_PART_BYTES);
    expect(ticket.parts.map((part) => part.partNumber)).toEqual([1, 2, 3, 4, 5]);

    // Fresh URLs for later parts, as the browser asks for when the first ones grow old.
    const resigned = await call(signParts, team.workspaceId, {
      key: ticket.key,
      uploadId: ticket.uploadId,
      partNumbers: [4, 5],
    });
    const { parts: fresh } = (await resigned.json()) as UploadTicket & {
      parts: { partNumber: number; url: string }[];
    };
    expect(fresh.map((part) => part.partNumber)).toEqual([4, 5]);
    const urls = new Map([...ticket.parts, ...fresh].map((part) => [part.partNumber, part.url]));

    const uploaded = await Promise.all(
      [1, 2, 3, 4, 5].map(async (partNumber) => {
        const start = (partNumber - 1) * ticket.partSize;
        const put = await fetch(urls.get(partNumber)!, {
          method: "PUT",
          body: body.subarray(start, start + ticket.partSize),
        });
        expect(put.status).toBe(200);
        return { partNumber, etag: put.headers.get("etag") ?? "" };
      }),
    );
    const completed = await call(completeUpload, team.workspaceId, {
      key: ticket.key,
      uploadId: ticket.uploadId,
      parts: uploaded,
    });
    expect(completed.status).toBe(200);
    expect((await headObject(ticket.key))?.contentLength).toBe(body.length);

    const result = await registerDataFile(team.workspaceId, {
      key: ticket.key,
      name: "many penguins.csv",
      kind: "dataset",
    });
    if (!result.ok) throw new Error(result.message);
    expect(result.data.sizeBytes).toBe(body.length);
    expect(result.data.preview?.truncated).toBe(true);
    expect(result.data.preview?.columns.map((column) => column.type)).toEqual([
      "numeric",
      "categorical",
      "categorical",
      "numeric",
      "numeric",
      "numeric",
      "numeric",
      "categorical",
    ]);
  });

  it("aborts a cancelled upload: no object appears under its key", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const response = await call(createUpload, team.workspaceId, {
      name: "big.csv",
      size: SINGLE_PUT_MAX_BYTES + 1,
      kind: "dataset",
      contentType: "text/csv",
    });
    const ticket = (await response.json()) as UploadTicket;
    if (ticket.method !== "multipart") throw new Error("a large file goes in parts");
    await fetch(ticket.parts[0].url, { method: "PUT", body: Buffer.alloc(1024, 97) });
    const abort = () =>
      call(abortUpload, team.workspaceId, { key: ticket.key, uploadId: ticket.uploadId });
    expect((await abort()).status).toBe(204);
    // Aborting twice is harmless (the browser may cancel while an abort is under way).
    expect((await abort()).status).toBe(204);
    expect(await headObject(ticket.key)).toBeUndefined();
    const registered = await registerDataFile(team.workspaceId, {
      key: ticket.key,
      name: "big.csv",
      kind: "dataset",
    });
    expect(registered).toMatchObject({ ok: false, status: 404 });
  });
});

describe("rejections, each with a clear message", () => {
  it("refuses too large, empty and wrong-type files before any byte is sent", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const describeFile = (name: string, size: number, kind = "dataset", contentType = "text/csv") =>
      call(createUpload, team.workspaceId, { name, size, kind, contentType });
    // The default limit (UPLOAD_MAX_BYTES unset) is 2 GiB.
    expect(await errorOf(await describeFile("huge.csv", 3 * 1024 ** 3))).toEqual({
      status: 422,
      message: '"huge.csv" is 3 GB; the largest file Partita accepts is 2 GB.',
    });
    expect(await errorOf(await describeFile("empty.csv", 0))).toEqual({
      status: 422,
      message: '"empty.csv" is empty (0 bytes).',
    });
    expect((await errorOf(await describeFile("data.xlsx", 10))).message).toMatch(
      /^"data\.xlsx" is not a CSV file/,
    );
    expect(
      (await errorOf(await describeFile("data.csv", 10, "dataset", "application/zip"))).message,
    ).toMatch(/is of type application\/zip/);
    expect((await errorOf(await describeFile("weights.csv", 10, "weights"))).message).toMatch(
      /must be a JSON file/,
    );
    expect((await errorOf(await describeFile("x.csv", 10, "spreadsheet"))).status).toBe(422);
    const notJson = await createUpload(
      new Request("http://127.0.0.1/x", { method: "POST", body: "{" }),
      { params: Promise.resolve({ workspaceId: team.workspaceId }) },
    );
    expect(await errorOf(notJson)).toEqual({
      status: 422,
      message: "The request body must be JSON.",
    });
  });

  it("refuses to register an empty object, binary content, a missing object and a foreign key", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const register = (key: string, name: string, kind: "dataset" | "layout" = "dataset") =>
      registerDataFile(team.workspaceId, { key, name, kind });

    const emptyKey = newKey(team.workspaceId, "empty.csv");
    await putObject({ key: emptyKey, body: "" });
    expect(await register(emptyKey, "empty.csv")).toMatchObject({
      ok: false,
      status: 422,
      fieldErrors: { file: '"empty.csv" is empty (0 bytes).' },
    });

    const binaryKey = newKey(team.workspaceId, "sheet.csv");
    await putObject({ key: binaryKey, body: new Uint8Array([0x50, 0x4b, 3, 4, 0, 0, 1, 2]) });
    expect(await register(binaryKey, "sheet.csv")).toMatchObject({
      ok: false,
      status: 422,
      message: expect.stringMatching(/^sheet\.csv: not a text CSV/),
    });

    expect(await register(newKey(team.workspaceId, "never.csv"), "never.csv")).toMatchObject({
      ok: false,
      status: 404,
      message: '"never.csv" has not arrived in storage. Please upload it again.',
    });

    // Someone else's object, even one that exists, is not registered here.
    const stranger = await createAccount("foreign");
    const foreignKey = newKey(stranger.workspaceId, "theirs.csv");
    await putObject({ key: foreignKey, body: penguinsCsv });
    for (const key of [
      foreignKey,
      "tests/anything.csv",
      `workspaces/${team.workspaceId}/reports/x.csv`,
    ]) {
      expect(await register(key, "theirs.csv")).toMatchObject({
        ok: false,
        status: 404,
        message: '"theirs.csv" was not uploaded to this workspace.',
      });
    }
    expect(
      await errorOf(
        await call(completeUpload, team.workspaceId, {
          key: foreignKey,
          uploadId: "x",
          parts: [{ partNumber: 1, etag: "e" }],
        }),
      ),
    ).toEqual({ status: 404, message: "There is no such upload in this workspace." });
    expect(await listDataFiles(team.workspaceId, "dataset")).toEqual([]);
  });

  it("refuses a partition map with a wrong header, naming what it found", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const key = newKey(team.workspaceId, "map.csv");
    await putObject({ key, body: "row,island\n0,Biscoe\n", contentType: "text/csv" });
    const result = await registerDataFile(team.workspaceId, {
      key,
      name: "map.csv",
      kind: "layout",
    });
    expect(result).toMatchObject({
      ok: false,
      status: 422,
      fieldErrors: {
        file: expect.stringMatching(
          /^map\.csv: the header is "row,island" \(expected a partition map with the header row_id,shard/,
        ),
      },
    });
  });
});

describe("who may upload", () => {
  it("answers 403 to reviewers, 404 to strangers and 401 when signed out, on every route and action", async () => {
    const team = await createTeam();
    const stranger = await createAccount("stranger");
    const key = newKey(team.workspaceId, "data.csv");
    await putObject({ key, body: penguinsCsv });
    const attempts: [string, () => Promise<number>][] = [
      [
        "create",
        async () =>
          (await call(createUpload, team.workspaceId, { name: "a.csv", size: 10, kind: "dataset" }))
            .status,
      ],
      [
        "parts",
        async () =>
          (await call(signParts, team.workspaceId, { key, uploadId: "u", partNumbers: [1] }))
            .status,
      ],
      [
        "complete",
        async () =>
          (
            await call(completeUpload, team.workspaceId, {
              key,
              uploadId: "u",
              parts: [{ partNumber: 1, etag: "e" }],
            })
          ).status,
      ],
      [
        "abort",
        async () => (await call(abortUpload, team.workspaceId, { key, uploadId: "u" })).status,
      ],
      [
        "preview as",
        async () => {
          const result = await previewDatasetAs(team.workspaceId, randomUUID(), {});
          return result.ok ? 200 : result.status;
        },
      ],
      [
        "register",
        async () => {
          const result = await registerDataFile(team.workspaceId, {
            key,
            name: "data.csv",
            kind: "dataset",
          });
          return result.ok ? 200 : result.status;
        },
      ],
    ];
    for (const [who, user, status] of [
      ["reviewer", team.reviewer, 403],
      ["stranger", stranger, 404],
      ["signed out", null, 401],
    ] as const) {
      actAs(user);
      for (const [name, attempt] of attempts) {
        expect(`${name} as ${who}: ${await attempt()}`).toBe(`${name} as ${who}: ${status}`);
      }
    }
    expect(await listDataFiles(team.workspaceId, "dataset")).toEqual([]);
  });
});
