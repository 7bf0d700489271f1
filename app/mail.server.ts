import nodemailer, { type Transporter } from "nodemailer";
import { z } from "zod";
import { env } from "./env.server.ts";

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
}

/** How long a send may wait on the mail server, in milliseconds: a page that sends mail answers within seconds even when the server hangs. */
export const MAIL_TIMEOUTS = { connectionTimeout: 5_000, greetingTimeout: 5_000, socketTimeout: 10_000 } as const;

/** A mail sender over SMTP at `url` (smtp://host:port); STARTTLS is used only when the server offers it. */
export function createMailer(url: string, from: string) {
  const transport: Transporter = nodemailer.createTransport({ url, ...MAIL_TIMEOUTS });
  return {
    async send(mail: OutgoingMail): Promise<{ messageId: string }> {
      const info = await transport.sendMail({ from, ...mail });
      return { messageId: info.messageId };
    },
    close: () => transport.close(),
  };
}

let mailer: ReturnType<typeof createMailer> | undefined;

/** Sends mail through SMTP_URL; fails with a clear message when no mail server is configured. */
export async function sendMail(mail: OutgoingMail): Promise<{ messageId: string }> {
  const { SMTP_URL, MAIL_FROM } = env();
  if (!SMTP_URL) throw new Error("Mail is not configured: set SMTP_URL (scripts/start points it at the local mail catcher).");
  mailer ??= createMailer(SMTP_URL, MAIL_FROM);
  return mailer.send(mail);
}

/** A message the local mail catcher caught (development and tests only). */
export const caughtMail = z.object({
  id: z.string(),
  receivedAt: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
});
export type CaughtMail = z.infer<typeof caughtMail>;

/** What the local mail catcher holds, newest first; null when the mailbox is not turned on. */
export async function readDevMailbox(): Promise<CaughtMail[] | null> {
  const base = env().DEV_MAILBOX_URL;
  if (!base) return null;
  const response = await fetch(`${base}/messages`);
  if (!response.ok) throw new Error(`the local mail catcher answered ${response.status}`);
  return z.array(caughtMail).parse(await response.json());
}
