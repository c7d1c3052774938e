import "server-only";
import { RateLimiterRes, sharedLimiter } from "@/lib/rate-limits/shared-limiter";

/**
 * Limits on signing in, signing up and e-mailed links, shared by every app process through
 * PostgreSQL. Wrong passwords slow down the client that types them rather than locking the
 * account, so nobody can keep its owner out: failures count per account *and* client address
 * (as the server sees it, lib/http/client-address.ts), and each client has a budget of its own.
 */
const FREE_FAILURES = 5;
const MAX_DELAY_SECONDS = 60;

const failures = sharedLimiter({
  keyPrefix: "sign-in-failures",
  points: 10_000,
  duration: 60 * 60,
});
const waits = sharedLimiter({ keyPrefix: "sign-in-wait", points: 1, duration: 1 });
const signInsPerClient = sharedLimiter({
  keyPrefix: "sign-in-client",
  points: 30,
  duration: 15 * 60,
});
const signUpsPerAddress = sharedLimiter({
  keyPrefix: "sign-up-address",
  points: 3,
  duration: 60 * 60,
});
const signUpsPerClient = sharedLimiter({
  keyPrefix: "sign-up-client",
  points: 20,
  duration: 60 * 60,
});
const linksPerAddress = sharedLimiter({ keyPrefix: "link-address", points: 3, duration: 10 * 60 });

function waitPhrase(seconds: number): string {
  if (seconds < 60) {
    const whole = Math.max(1, Math.ceil(seconds));
    return `${whole} second${whole === 1 ? "" : "s"}`;
  }
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? "" : "s"}`;
}

export class TooManyAttemptsError extends Error {
  constructor(
    readonly retryAfterSeconds: number,
    what = "sign-in attempts",
  ) {
    super(`Too many ${what}. Wait ${waitPhrase(retryAfterSeconds)} and try again.`);
    this.name = "TooManyAttemptsError";
  }
}

/**
 * Seconds a client waits after its n-th wrong password for one account: none for the first five,
 * then doubling from one second up to a minute (progressive delay, OWASP's advice against
 * account lock-out; common practice).
 */
export function signInDelaySeconds(failureCount: number): number {
  if (failureCount < FREE_FAILURES) return 0;
  return Math.min(2 ** (failureCount - FREE_FAILURES), MAX_DELAY_SECONDS);
}

const failureKey = (email: string, client: string) => `${email.toLowerCase()}|${client}`;

async function spend(
  limiter: ReturnType<typeof sharedLimiter>,
  key: string,
  what: string,
): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (rejection) {
    if (rejection instanceof RateLimiterRes) {
      throw new TooManyAttemptsError(rejection.msBeforeNext / 1000, what);
    }
    throw rejection;
  }
}

/** Before a password is checked: refuses while this client must wait, or its budget is spent. */
export async function admitSignInAttempt(email: string, client: string): Promise<void> {
  const wait = await waits.get(failureKey(email, client));
  if (wait && wait.consumedPoints > waits.points) {
    throw new TooManyAttemptsError(wait.msBeforeNext / 1000);
  }
  await spend(signInsPerClient, client, "sign-in attempts");
}

/** After a wrong password: counts it and, past the free ones, makes this client wait. */
export async function recordFailedSignIn(email: string, client: string): Promise<void> {
  const key = failureKey(email, client);
  const counted = await failures.consume(key).catch((rejection: unknown) => {
    if (rejection instanceof RateLimiterRes) return rejection;
    throw rejection;
  });
  const delay = signInDelaySeconds(counted.consumedPoints);
  if (delay > 0) await waits.block(key, delay);
}

/** A successful sign-in forgets this client's earlier typos for the account. */
export async function clearSignInFailures(email: string, client: string): Promise<void> {
  const key = failureKey(email, client);
  await Promise.all([failures.delete(key), waits.delete(key)]);
}

/** Each sign-up sends an e-mail: a few per address and per client an hour. */
export async function admitSignUp(email: string, client: string): Promise<void> {
  await spend(signUpsPerAddress, email.toLowerCase(), "sign-ups for this address");
  await spend(signUpsPerClient, client, "sign-ups from this connection");
}

/** E-mailed sign-in links: three per address every ten minutes. */
export async function admitSignInLink(email: string): Promise<void> {
  await spend(linksPerAddress, email.toLowerCase(), "sign-in links for this address");
}
