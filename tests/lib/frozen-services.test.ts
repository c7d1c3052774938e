// A storage or mail server that accepts connections and never answers must not hang Partita:
// every call fails after its configured timeout. Without the timeouts these calls wait forever
// (the SDK and nodemailer set none, or minutes), so each test below would run into vitest's limit.
import { HeadObjectCommand } from "@aws-sdk/client-s3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createMailTransport } from "@/lib/mail";
import { createStorageTarget } from "@/lib/storage";
import { startFrozenServer, type FrozenServer } from "@/tests/support/frozen-server";

const timeoutMs = 300;
let frozen: FrozenServer;

beforeAll(async () => {
  frozen = await startFrozenServer();
});

afterAll(async () => {
  await frozen.close();
});

describe("calls against a frozen server", () => {
  it("a storage call fails with a timeout instead of hanging", { timeout: 15_000 }, async () => {
    const { client, bucket } = createStorageTarget({
      S3_ENDPOINT: `http://127.0.0.1:${frozen.port}`,
      S3_REGION: "us-east-1",
      S3_BUCKET: "frozen",
      S3_ACCESS_KEY_ID: "key",
      S3_SECRET_ACCESS_KEY: "secret",
      S3_FORCE_PATH_STYLE: true,
      STORAGE_TIMEOUT_MS: timeoutMs,
    });
    const before = frozen.accepted;
    await expect(
      client.send(new HeadObjectCommand({ Bucket: bucket, Key: "never-answered.csv" })),
    ).rejects.toThrow(/timeout|timed out/i);
    expect(frozen.accepted).toBeGreaterThan(before);
    client.destroy();
  });

  it("a mail send fails with a timeout instead of hanging", { timeout: 15_000 }, async () => {
    const transport = createMailTransport({
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: frozen.port,
      SMTP_SECURE: false,
      SMTP_USER: undefined,
      SMTP_PASSWORD: undefined,
      MAIL_TIMEOUT_MS: timeoutMs,
    });
    const before = frozen.accepted;
    await expect(
      transport.sendMail({
        from: "no-reply@partita.local",
        to: "reviewer@example.test",
        subject: "never sent",
        text: "the server never greets",
      }),
    ).rejects.toMatchObject({ code: "ETIMEDOUT" });
    expect(frozen.accepted).toBeGreaterThan(before);
    transport.close();
  });
});
