import { RateLimiterMemory, RateLimiterRes } from "rate-limiter-flexible";

/**
 * Sign-in attempts are limited per address and per client so that password guessing is slow
 * either way. Kept in process memory: one app process serves a workspace installation today; a
 * deployment with several app processes would swap in the package's PostgreSQL store.
 */
const perAccount = new RateLimiterMemory({
  keyPrefix: "sign-in-account",
  points: 5,
  duration: 15 * 60,
});
const perClient = new RateLimiterMemory({
  keyPrefix: "sign-in-client",
  points: 30,
  duration: 15 * 60,
});

export class TooManyAttemptsError extends Error {
  constructor(readonly retryAfterSeconds: number) {
    const minutes = Math.max(1, Math.ceil(retryAfterSeconds / 60));
    super(
      `Too many sign-in attempts. Wait ${minutes} minute${minutes === 1 ? "" : "s"} and try again.`,
    );
    this.name = "TooManyAttemptsError";
  }
}

/** Counts one attempt; throws TooManyAttemptsError once either budget is spent. */
export async function recordSignInAttempt(email: string, client: string): Promise<void> {
  try {
    await Promise.all([perAccount.consume(email.toLowerCase()), perClient.consume(client)]);
  } catch (rejection) {
    if (rejection instanceof RateLimiterRes)
      throw new TooManyAttemptsError(rejection.msBeforeNext / 1000);
    throw rejection;
  }
}

/** A successful sign-in clears the account's budget so typos earlier do not count against later. */
export async function clearSignInAttempts(email: string): Promise<void> {
  await perAccount.delete(email.toLowerCase());
}
