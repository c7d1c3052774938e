import { describe, expect, it } from "vitest";
import {
  buildUploadKey,
  findUploadProblem,
  formatBytes,
  isUploadKeyOf,
  MULTIPART_PART_BYTES,
  planUpload,
  sanitizeFileName,
  SINGLE_PUT_MAX_BYTES,
} from "@/lib/uploads/file-rules";

const GiB = 1024 ** 3;
const csv = (name: string, size = 100, contentType = "text/csv") => ({ name, size, contentType });

describe("what may be uploaded", () => {
  it("takes CSV for datasets and layouts and JSON for weights, whatever type the browser guessed", () => {
    expect(findUploadProblem(csv("data.csv"), "dataset", GiB)).toBeNull();
    // Windows browsers label .csv as an Excel type; some browsers give no type at all.
    expect(findUploadProblem(csv("DATA.CSV", 1, "application/vnd.ms-excel"), "layout", GiB)).toBe(
      null,
    );
    expect(findUploadProblem(csv("map.csv", 1, ""), "layout", GiB)).toBeNull();
    expect(findUploadProblem(csv("w.json", 1, "application/json"), "weights", GiB)).toBeNull();
  });

  it("takes gzip-compressed CSV and Parquet for datasets and layouts, not for weights", () => {
    expect(findUploadProblem(csv("data.CSV.GZ", 1, "application/gzip"), "dataset", GiB)).toBeNull();
    expect(findUploadProblem(csv("map.csv.gz", 1, ""), "layout", GiB)).toBeNull();
    expect(
      findUploadProblem(csv("data.parquet", 1, "application/octet-stream"), "dataset", GiB),
    ).toBeNull();
    // A gzip of something other than CSV, and a Parquet file sent as text, are refused.
    expect(findUploadProblem(csv("data.json.gz", 1, "application/gzip"), "dataset", GiB)).toMatch(
      /is not a CSV file/,
    );
    expect(findUploadProblem(csv("data.parquet", 1, "text/csv"), "dataset", GiB)).toMatch(
      /is of type text\/csv/,
    );
    expect(findUploadProblem(csv("w.parquet", 1, ""), "weights", GiB)).toMatch(/must be a JSON/);
  });

  it("names the file and what is expected when the type is wrong", () => {
    expect(findUploadProblem(csv("sheet.xlsx"), "dataset", GiB)).toBe(
      '"sheet.xlsx" is not a CSV file (.csv, comma- or semicolon-separated text with a header row), the same compressed with gzip (.csv.gz), or a Parquet file (.parquet). The dataset must be a CSV file (.csv, comma- or semicolon-separated text with a header row), the same compressed with gzip (.csv.gz), or a Parquet file (.parquet).',
    );
    expect(findUploadProblem(csv("data.csv", 10, "application/pdf"), "dataset", GiB)).toMatch(
      /^"data\.csv" is of type application\/pdf, not a CSV file/,
    );
    expect(findUploadProblem(csv("w.csv"), "weights", GiB)).toMatch(
      /The reference weights file must be a JSON file/,
    );
  });

  it("refuses empty files and files over the limit, naming both sizes", () => {
    expect(findUploadProblem(csv("data.csv", 0), "dataset", GiB)).toBe(
      '"data.csv" is empty (0 bytes).',
    );
    expect(findUploadProblem(csv("data.csv", 3 * GiB), "dataset", 2 * GiB)).toBe(
      '"data.csv" is 3 GB; the largest file Partita accepts is 2 GB.',
    );
    expect(findUploadProblem(csv("data.csv", 2 * GiB), "dataset", 2 * GiB)).toBeNull();
  });
});

describe("how a file travels", () => {
  it("goes in one PUT up to 64 MB and in 16 MB parts above", () => {
    expect(planUpload(SINGLE_PUT_MAX_BYTES)).toEqual({ method: "single" });
    expect(planUpload(SINGLE_PUT_MAX_BYTES + 1)).toEqual({
      method: "multipart",
      partSize: MULTIPART_PART_BYTES,
      partCount: 5,
    });
  });

  it("grows the part size to stay within S3's 10,000 parts (S3 documented limit)", () => {
    const plan = planUpload(500 * GiB);
    expect(plan.method).toBe("multipart");
    if (plan.method === "multipart") {
      expect(plan.partCount).toBeLessThanOrEqual(10_000);
      expect(plan.partSize * plan.partCount).toBeGreaterThanOrEqual(500 * GiB);
    }
  });

  it("formats sizes in binary multiples", () => {
    expect(formatBytes(0)).toBe("0 bytes");
    expect(formatBytes(1536)).toBe("1.5 KB");
    expect(formatBytes(64 * 1024 * 1024)).toBe("64 MB");
  });
});

describe("object keys", () => {
  const workspaceId = "5f0c2a8e-1111-4222-8333-944455556666";
  const id = "0b5e8f9a-aaaa-4bbb-8ccc-ddddeeeeffff";

  it("puts uploads under the workspace's prefix with a safe file name", () => {
    expect(buildUploadKey(workspaceId, "Orchard data (2024).csv", id)).toBe(
      `workspaces/${workspaceId}/files/${id}/Orchard-data-2024-.csv`,
    );
    expect(sanitizeFileName("../../etc/passwd")).toBe("passwd");
    expect(sanitizeFileName("données été.csv")).toBe("donnees-ete.csv");
    expect(sanitizeFileName("???")).toBe("file");
    const long = sanitizeFileName(`${"a".repeat(300)}.csv`);
    expect(long).toHaveLength(100);
    expect(long.endsWith(".csv")).toBe(true);
  });

  it("recognizes only this workspace's upload keys", () => {
    const key = buildUploadKey(workspaceId, "data.csv", id);
    expect(isUploadKeyOf(workspaceId, key)).toBe(true);
    expect(isUploadKeyOf("another-workspace", key)).toBe(false);
    expect(isUploadKeyOf(workspaceId, `workspaces/${workspaceId}/files/${id}/../x.csv`)).toBe(
      false,
    );
    expect(isUploadKeyOf(workspaceId, `workspaces/${workspaceId}/files/${id}/..`)).toBe(false);
    expect(isUploadKeyOf(workspaceId, `workspaces/${workspaceId}/files/not-a-uuid/x.csv`)).toBe(
      false,
    );
    expect(isUploadKeyOf(workspaceId, `workspaces/${workspaceId}/files/${id}/a/b.csv`)).toBe(false);
    expect(isUploadKeyOf(workspaceId, `workspaces/${workspaceId}/reports/${id}/x.csv`)).toBe(false);
  });
});
