import { z } from "zod";

/**
 * Where a page of a newest-first list (files, analyses) ends, for the next page to start after it:
 * the last row's exact creation time (PostgreSQL's text, microseconds included, which a Date would
 * round) and its id, the list's order. Opaque to callers (base64url JSON), as the reports list's.
 */
export type ListCursor = { createdAt: string; id: string };

const cursorSchema = z.tuple([
  z.string().regex(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}(\.\d{1,6})?[+-]\d{2}(:\d{2})?$/),
  z.string().min(1).max(100),
]);

export function encodeListCursor(cursor: ListCursor): string {
  return Buffer.from(JSON.stringify([cursor.createdAt, cursor.id])).toString("base64url");
}

/** The cursor a page handed out, or undefined for anything else. */
export function decodeListCursor(text: string): ListCursor | undefined {
  try {
    const parsed = cursorSchema.safeParse(JSON.parse(Buffer.from(text, "base64url").toString()));
    if (!parsed.success) return undefined;
    const [createdAt, id] = parsed.data;
    return { createdAt, id };
  } catch {
    return undefined;
  }
}
