/**
 * The CLI's side of /api/v1: bearer-token requests, JSON in and out, the API's error shape turned
 * into a ServerError, and one wait-and-retry when the token's rate limit answers 429.
 */

/** The server refused or failed a request; `status` and `code` are the API's. */
export class ServerError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
    this.name = "ServerError";
  }
}

export type ApiClient = {
  getJson<T>(path: string): Promise<T>;
  getText(path: string): Promise<string>;
  postJson<T>(path: string, body: unknown): Promise<T>;
};

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function readServerError(response: Response, path: string): Promise<ServerError> {
  const text = await response.text();
  try {
    const { error } = JSON.parse(text) as { error: { code: string; message: string } };
    const fields = (error as { fieldErrors?: Record<string, string> }).fieldErrors;
    const detail = fields
      ? ` (${Object.entries(fields)
          .map(([field, message]) => `${field}: ${message}`)
          .join("; ")})`
      : "";
    return new ServerError(response.status, error.code, `${error.message}${detail}`);
  } catch {
    return new ServerError(
      response.status,
      "unexpected_answer",
      `${path} answered ${response.status} without the API's error body`,
    );
  }
}

export function createApiClient(server: string, token: string): ApiClient {
  const base = server.replace(/\/+$/, "");
  async function send(path: string, init: RequestInit = {}): Promise<Response> {
    for (let attempt = 0; ; attempt += 1) {
      const response = await fetch(`${base}${path}`, {
        ...init,
        headers: { ...init.headers, authorization: `Bearer ${token}` },
      });
      if (response.status === 429 && attempt === 0) {
        const seconds = Number(response.headers.get("retry-after") ?? "1");
        await sleep(Math.min(60, Math.max(1, seconds)) * 1000);
        continue;
      }
      if (!response.ok) throw await readServerError(response, path);
      return response;
    }
  }
  return {
    getJson: async <T>(path: string) => (await (await send(path)).json()) as T,
    getText: async (path: string) => (await send(path)).text(),
    postJson: async <T>(path: string, body: unknown) =>
      (await (
        await send(path, {
          method: "POST",
          headers: { "content-type": "application/json" },
          body: JSON.stringify(body),
        })
      ).json()) as T,
  };
}
