import "server-only";
import { RateLimiterPostgres, RateLimiterRes } from "rate-limiter-flexible";
import { dbPool } from "@/db/client";

export { RateLimiterRes };

type LimiterOptions = { keyPrefix: string; points: number; duration: number };

/**
 * A rate limit whose counters live in PostgreSQL (the `rate_limits` table, created by a
 * migration), so every app process and the worker share one budget per key. Built on first use
 * from the process's pool, and again if tests or scripts closed that pool in between.
 */
export function sharedLimiter(options: LimiterOptions) {
  let built: { pool: unknown; limiter: RateLimiterPostgres } | undefined;
  const limiter = (): RateLimiterPostgres => {
    const pool = dbPool();
    if (built?.pool === pool) return built.limiter;
    const fresh = new RateLimiterPostgres({
      ...options,
      storeClient: pool,
      tableName: "rate_limits",
      tableCreated: true,
    });
    built = { pool, limiter: fresh };
    return fresh;
  };
  return {
    points: options.points,
    /** Spends points; rejects with a RateLimiterRes once the budget is spent. */
    consume: (key: string, points = 1) => limiter().consume(key, points),
    /** How much of the budget is used, or null when nothing is. */
    get: (key: string) => limiter().get(key),
    /** Marks the key as spent for the given seconds. */
    block: (key: string, seconds: number) => limiter().block(key, seconds),
    delete: (key: string) => limiter().delete(key),
  };
}
