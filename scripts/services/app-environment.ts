import { readEnvironment } from "@/lib/env";

export interface AppServices {
  databaseUrl: string;
  nextAuthSecret: string;
  appUrl: string;
  /** The local S3 fake, or undefined to pass the caller's S3_* configuration through. */
  fakeS3?: { endpoint: string; accessKeyId: string; secretAccessKey: string; bucket: string };
  /** The local SMTP fake, or undefined to pass the caller's SMTP_* configuration through. */
  fakeSmtp?: { port: number; mailDirectory: string };
}

/**
 * The environment the app (and tests) run with: the caller's environment with the services this
 * orchestrator started filled in. Validated with the app's own schema so bad configuration fails
 * here, with one line per problem, rather than inside the running app.
 */
export function buildAppEnvironment(services: AppServices): NodeJS.ProcessEnv {
  const environment: NodeJS.ProcessEnv = {
    ...process.env,
    DATABASE_URL: services.databaseUrl,
    NEXTAUTH_SECRET: services.nextAuthSecret,
    NEXTAUTH_URL: services.appUrl,
    NEXT_TELEMETRY_DISABLED: "1",
    // The SDK is pinned to a release that supports Node 20 (stack.md); its notice that later
    // releases will not is known and would only repeat in every process's output.
    AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: "true",
  };
  if (services.fakeS3) {
    Object.assign(environment, {
      S3_ENDPOINT: services.fakeS3.endpoint,
      S3_REGION: "us-east-1",
      S3_BUCKET: services.fakeS3.bucket,
      S3_ACCESS_KEY_ID: services.fakeS3.accessKeyId,
      S3_SECRET_ACCESS_KEY: services.fakeS3.secretAccessKey,
      S3_FORCE_PATH_STYLE: "true",
    });
  }
  if (services.fakeSmtp) {
    Object.assign(environment, {
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(services.fakeSmtp.port),
      SMTP_SECURE: "false",
      DEV_MAIL_DIR: services.fakeSmtp.mailDirectory,
    });
    delete environment.SMTP_USER;
    delete environment.SMTP_PASSWORD;
  } else {
    // The development inbox exists only while the fake catches the mail.
    delete environment.DEV_MAIL_DIR;
  }
  readEnvironment(environment);
  return environment;
}
