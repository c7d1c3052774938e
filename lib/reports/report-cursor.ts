import { z } from "zod";

/**
 * Where a page of the reports list ends, for the next page to start after it: the last report's
 * exact creation time (PostgreSQL's text, microseconds included, which a Date would round), version
 * and id, the list's order. Opaque to callers (base64url JSON), so its form may change.
 */
export type ReportCursor = { createdAt: string; version: number; id: string };

const cursorSchema = z.tuple([
  z.string().regex(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}(\.\d{1,6})?[+-]\d{2}(:\d{2})?$/),
  z.number().int().positive(),
  z.string().min(1).max(100),
]);

export function encodeReportCursor(cursor: ReportCursor): string {
  return Buffer.from(JSON.stringify([cursor.createdAt, cursor.version, cursor.id])).toString(
    "base64url",
  );
}

/** The cursor a page handed out, or undefined for anything else. */
export function decodeReportCursor(text: string): ReportCursor | undefined {
  try {
    const parsed = cursorSchema.safeParse(JSON.parse(Buffer.from(text, "base64url").toString()));
    if (!parsed.success) return undefined;
    const [createdAt, version, id] = parsed.data;
    return { createdAt, version, id };
  } catch {
    return undefined;
  }
}
