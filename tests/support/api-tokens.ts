import { insertApiToken } from "@/db/queries/api-tokens";
import { API_TOKENS } from "@/lib/auth/api-token-secret";

/** A token made straight in the database (as the tokens page would), for API and CLI tests. */
export async function issueTestToken(
  userId: string,
  workspaceId: string,
  expiresAt = new Date(Date.now() + 24 * 60 * 60 * 1000),
): Promise<{ token: string; tokenId: string }> {
  const { secret: token, hash: tokenHash } = API_TOKENS.create();
  const row = await insertApiToken({
    userId,
    workspaceId,
    name: "test pipeline",
    tokenHash,
    expiresAt,
  });
  return { token, tokenId: row.id };
}

/** A GET or JSON POST to an /api/v1 handler as a pipeline would send it. */
export function apiRequest(path: string, token: string | undefined, body?: unknown): Request {
  const headers: Record<string, string> = {};
  if (token) headers.authorization = `Bearer ${token}`;
  if (body !== undefined) headers["content-type"] = "application/json";
  return new Request(`http://partita.test${path}`, {
    method: body === undefined ? "GET" : "POST",
    headers,
    body: body === undefined ? undefined : JSON.stringify(body),
  });
}
