// Every browser test signs up and in from 127.0.0.1, so the whole suite shares one client's
// sign-in and sign-up budgets (lib/auth/rate-limit.ts), which a growing suite outruns. Each test
// file starts with those per-client counters cleared; the limits themselves are tested on their own.
import pg from "pg";
import { beforeAll } from "vitest";

beforeAll(async () => {
  const connectionString = process.env.DATABASE_URL;
  if (!connectionString) return;
  const client = new pg.Client({ connectionString });
  await client.connect();
  try {
    await client.query(
      "delete from rate_limits where key like 'sign-in-client:%' or key like 'sign-up-client:%'",
    );
  } finally {
    await client.end();
  }
});
