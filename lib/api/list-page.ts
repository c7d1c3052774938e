import { RuleError } from "@/lib/errors";
import { decodeListCursor, type ListCursor } from "./list-cursor";
import { listPageQuerySchema } from "./schemas";

/** A list route's page from its query: how many, and after which row (a cursor it handed out). */
export function readListPage(request: Request): { limit: number; after?: ListCursor } {
  const query = Object.fromEntries(new URL(request.url).searchParams);
  const { limit, cursor } = listPageQuerySchema.parse(query);
  if (cursor === undefined) return { limit };
  const after = decodeListCursor(cursor);
  if (!after) throw new RuleError(422, "cursor must be a nextCursor this API returned.", "cursor");
  return { limit, after };
}
