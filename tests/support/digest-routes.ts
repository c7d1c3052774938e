import { GET as describeClient } from "@/app/api/v1/digests/client/route";
import { GET as readEncoding } from "@/app/api/v1/digests/encoding/route";
import { POST as answerExchange } from "@/app/api/v1/digests/exchanges/[exchangeId]/route";
import { POST as sendGradients } from "@/app/api/v1/digests/gradients/route";
import { POST as sendSchema } from "@/app/api/v1/digests/schema/route";
import { GET as waitForWork } from "@/app/api/v1/digests/work/route";
import { ServerError, type ApiClient } from "@/lib/cli/api-client";
import { apiRequest } from "./api-tokens";

/**
 * The client-key routes of /api/v1/digests called in-process, shaped like the CLI's ApiClient, so
 * the online client's own loop (lib/cli/digest-online.ts) runs against the real handlers, service
 * and database. `dropWhen` simulates a lost connection: the request is not delivered.
 */
export function createDigestRoutesClient(
  key: string,
  dropWhen: (method: "GET" | "POST", path: string) => boolean = () => false,
): Pick<ApiClient, "getJson" | "postJson"> {
  async function send(method: "GET" | "POST", path: string, body?: unknown): Promise<unknown> {
    if (dropWhen(method, path)) throw new TypeError("fetch failed (connection dropped)");
    const request = apiRequest(path, key, body);
    const route = new URL(request.url).pathname;
    const exchange = /^\/api\/v1\/digests\/exchanges\/([^/]+)$/.exec(route);
    const response = exchange
      ? await answerExchange(request, { params: Promise.resolve({ exchangeId: exchange[1] }) })
      : method === "GET"
        ? await {
            "/api/v1/digests/client": describeClient,
            "/api/v1/digests/encoding": readEncoding,
            "/api/v1/digests/work": waitForWork,
          }[route]!(request)
        : await {
            "/api/v1/digests/schema": sendSchema,
            "/api/v1/digests/gradients": sendGradients,
          }[route]!(request);
    const answer = await response.json();
    if (!response.ok) {
      const { error } = answer as { error: { code: string; message: string } };
      throw new ServerError(response.status, error.code, error.message);
    }
    return answer;
  }
  return {
    getJson: async <T>(path: string) => (await send("GET", path)) as T,
    postJson: async <T>(path: string, body: unknown) => (await send("POST", path, body)) as T,
  };
}
