import { RateLimiterRes, sharedLimiter } from "@/lib/rate-limits/shared-limiter";
import { rateLimited } from "./errors";

/**
 * Requests per token per minute. A pipeline polling an analysis once a second uses 60, and an
 * upload of a 2 GiB file in 64 MiB parts a few dozen more, so only a runaway loop reaches it.
 */
export const API_REQUESTS_PER_MINUTE = 240;

// Counted in PostgreSQL, so several app processes share one budget per token.
const perToken = sharedLimiter({
  keyPrefix: "api-token",
  points: API_REQUESTS_PER_MINUTE,
  duration: 60,
});

/** Counts one request of a token; throws a 429 ApiError (with Retry-After) once the minute is spent. */
export async function consumeApiRequest(tokenId: string): Promise<void> {
  await consumeOrRefuse(perToken, tokenId);
}

/** Counts one request against `key`'s budget; a spent budget is a 429 ApiError with Retry-After. */
export async function consumeOrRefuse(
  limiter: ReturnType<typeof sharedLimiter>,
  key: string,
): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (rejection) {
    if (rejection instanceof RateLimiterRes) {
      throw rateLimited(Math.max(1, Math.ceil(rejection.msBeforeNext / 1000)));
    }
    throw rejection;
  }
}
