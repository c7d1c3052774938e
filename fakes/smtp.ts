import { randomUUID } from "node:crypto";
import { mkdirSync } from "node:fs";
import { rename, writeFile } from "node:fs/promises";
import path from "node:path";
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from "smtp-server";

export interface FakeSmtpOptions {
  port: number;
  /** Every accepted message is written here as one .eml file (DEV_MAIL_DIR). */
  directory: string;
}

export interface RunningFakeSmtp {
  port: number;
  stop(): Promise<void>;
}

const maxMessageBytes = 25 * 1024 * 1024;

/**
 * A local SMTP catcher on 127.0.0.1: it accepts every message and keeps it as a file instead of
 * delivering it. STARTTLS and AUTH are disabled: smtp-server's built-in certificate has expired and
 * next-auth's e-mail provider sends empty credentials.
 */
export async function startFakeSmtp(options: FakeSmtpOptions): Promise<RunningFakeSmtp> {
  mkdirSync(options.directory, { recursive: true });
  const server = new SMTPServer({
    disabledCommands: ["STARTTLS", "AUTH"],
    authOptional: true,
    logger: false,
    size: maxMessageBytes,
    onData(stream, session, callback) {
      readMessage(stream)
        .then((raw) => storeMessage(options.directory, session, raw))
        .then(() => callback(), callback);
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  return {
    port: options.port,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

async function readMessage(stream: SMTPServerDataStream): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  if (stream.sizeExceeded) throw new Error(`message larger than ${maxMessageBytes} bytes`);
  return Buffer.concat(chunks);
}

/**
 * Names sort by arrival time. The envelope recipients are added as a header because Bcc recipients
 * appear nowhere else in the message. Written under a temporary name and renamed, so a reader never
 * sees half a message.
 */
async function storeMessage(directory: string, session: SMTPServerSession, raw: Buffer) {
  const recipients = session.envelope.rcptTo.map((recipient) => recipient.address).join(", ");
  const envelopeHeader = Buffer.from(`X-Envelope-To: ${recipients}\r\n`);
  const name = `${new Date().toISOString().replace(/[:.]/g, "-")}-${randomUUID().slice(0, 8)}`;
  const temporary = path.join(directory, `.${name}.tmp`);
  await writeFile(temporary, Buffer.concat([envelopeHeader, raw]));
  await rename(temporary, path.join(directory, `${name}.eml`));
}
