/**
 * A local mail catcher for development and tests only: an SMTP server that accepts every message
 * (no TLS: smtp-server's built-in certificate has expired, so STARTTLS is switched off; no AUTH),
 * parses it with mailparser and keeps the latest ones in memory, plus a small HTTP API that the
 * app's development mailbox page reads.
 *
 *   GET    /messages   caught messages, newest first (JSON)
 *   DELETE /messages   forget them all
 *
 * Mail to any address at REFUSED_DOMAIN is refused at RCPT TO with 550, as a real server refuses an unknown
 * mailbox, so tests can see how the app copes with mail that cannot be sent.
 *
 * Run: node --import tsx scripts/fakes/mail.ts  (FAKE_SMTP_PORT, FAKE_MAILBOX_PORT)
 */
import { randomUUID } from "node:crypto";
import { createServer } from "node:http";
import type { AddressInfo } from "node:net";
import { pathToFileURL } from "node:url";
import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";

export interface CaughtMessage {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
}

export interface FakeMail {
  /** SMTP URL for nodemailer, e.g. smtp://127.0.0.1:54325. */
  smtpUrl: string;
  /** Base URL of the HTTP API, e.g. http://127.0.0.1:54326. */
  mailboxUrl: string;
  messages(): CaughtMessage[];
  close(): Promise<void>;
}

/** Recipients at this domain are refused (550), for tests of mail that cannot be sent. The .test name is reserved (RFC 2606). */
export const REFUSED_DOMAIN = "refused.test";

/** Messages kept; older ones are dropped. */
const KEEP = 200;

const addresses = (a: AddressObject | AddressObject[] | undefined): string[] =>
  (Array.isArray(a) ? a : a ? [a] : []).flatMap((o) => o.value.map((v) => v.address ?? "").filter(Boolean));

/** Starts the catcher on 127.0.0.1 (port 0 picks a free one). */
export async function startFakeMail(options: { smtpPort?: number; httpPort?: number } = {}): Promise<FakeMail> {
  const caught: CaughtMessage[] = [];

  const smtp = new SMTPServer({
    disabledCommands: ["STARTTLS", "AUTH"],
    authOptional: true,
    logger: false,
    banner: "Skewsmith local mail catcher",
    size: 10 * 1024 * 1024,
    onRcptTo(address, _session, callback) {
      if (address.address.toLowerCase().endsWith(`@${REFUSED_DOMAIN}`)) {
        const refusal = Object.assign(new Error(`5.1.1 <${address.address}>: mailbox unavailable`), { responseCode: 550 });
        return callback(refusal);
      }
      callback();
    },
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          caught.unshift({
            id: randomUUID(),
            receivedAt: new Date().toISOString(),
            from: addresses(mail.from)[0] ?? session.envelope.mailFrom?.toString() ?? "",
            to: session.envelope.rcptTo.map((r) => r.address),
            subject: mail.subject ?? "",
            text: mail.text ?? "",
          });
          caught.length = Math.min(caught.length, KEEP);
          callback();
        })
        .catch((error: Error) => callback(error));
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.server.once("error", reject);
    smtp.listen(options.smtpPort ?? 0, "127.0.0.1", () => resolve());
  });

  const http = createServer((req, res) => {
    const url = new URL(req.url ?? "/", "http://127.0.0.1");
    if (url.pathname === "/messages" && req.method === "GET") {
      res.writeHead(200, { "Content-Type": "application/json", "Cache-Control": "no-store" });
      return res.end(JSON.stringify(caught));
    }
    if (url.pathname === "/messages" && req.method === "DELETE") {
      caught.length = 0;
      res.writeHead(204);
      return res.end();
    }
    res.writeHead(404, { "Content-Type": "application/json" });
    res.end(JSON.stringify({ message: "Not Found" }));
  });
  await new Promise<void>((resolve, reject) => {
    http.once("error", reject);
    http.listen(options.httpPort ?? 0, "127.0.0.1", () => resolve());
  });

  const smtpPort = (smtp.server.address() as AddressInfo).port;
  const httpPort = (http.address() as AddressInfo).port;
  return {
    smtpUrl: `smtp://127.0.0.1:${smtpPort}`,
    mailboxUrl: `http://127.0.0.1:${httpPort}`,
    messages: () => [...caught],
    close: async () => {
      http.closeAllConnections();
      await Promise.all([
        new Promise<void>((resolve) => smtp.close(() => resolve())),
        new Promise<void>((resolve) => http.close(() => resolve())),
      ]);
    },
  };
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const fake = await startFakeMail({
    smtpPort: Number(process.env.FAKE_SMTP_PORT ?? 54325),
    httpPort: Number(process.env.FAKE_MAILBOX_PORT ?? 54326),
  });
  console.error(`fake mail: SMTP at ${fake.smtpUrl}, mailbox API at ${fake.mailboxUrl}`);
  const stop = () => void fake.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
