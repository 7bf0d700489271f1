import { connect } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createMailer } from "../../app/mail.server.ts";
import { REFUSED_DOMAIN, startFakeMail, type FakeMail } from "./mail.ts";

let fake: FakeMail;
beforeAll(async () => {
  fake = await startFakeMail();
});
afterAll(() => fake.close());

/** Talks SMTP by hand: the lines the server answers to EHLO (RFC 5321 §4.1.1.1). */
function ehlo(url: string): Promise<string[]> {
  const { hostname, port } = new URL(url);
  return new Promise((resolve, reject) => {
    const socket = connect(Number(port), hostname);
    let buffer = "";
    let greeted = false;
    socket.on("data", (chunk) => {
      buffer += chunk.toString();
      if (!greeted && /^220 /m.test(buffer)) {
        greeted = true;
        buffer = "";
        socket.write("EHLO tester.example\r\n");
      } else if (greeted && /^250 /m.test(buffer)) {
        socket.end("QUIT\r\n");
        resolve(buffer.trim().split(/\r?\n/));
      }
    });
    socket.on("error", reject);
  });
}

describe("the local mail catcher", () => {
  it("does not offer STARTTLS or AUTH (its built-in certificate has expired)", async () => {
    const lines = await ehlo(fake.smtpUrl);
    expect(lines[0]).toMatch(/^250/);
    expect(lines.join("\n")).not.toMatch(/STARTTLS|AUTH/);
  });

  it("catches what the app's mailer sends, parsed, newest first, and serves it over HTTP", async () => {
    const mailer = createMailer(fake.smtpUrl, "Skewsmith <no-reply@skewsmith.invalid>");
    await mailer.send({ to: "first@example.test", subject: "First", text: "one" });
    await mailer.send({ to: "second@example.test", subject: "Zweite Nachricht – ü", text: "two\nlines" });
    mailer.close();
    const messages = await (await fetch(`${fake.mailboxUrl}/messages`)).json();
    expect(messages.map((m: { subject: string }) => m.subject)).toEqual(["Zweite Nachricht – ü", "First"]);
    expect(messages[0]).toMatchObject({ from: "no-reply@skewsmith.invalid", to: ["second@example.test"], text: "two\nlines\n" });
    await fetch(`${fake.mailboxUrl}/messages`, { method: "DELETE" });
    expect(await (await fetch(`${fake.mailboxUrl}/messages`)).json()).toEqual([]);
  });
});

describe("refused mailboxes", () => {
  it("refuses mail to the refused domain at RCPT TO with 550, and catches nothing", async () => {
    const mailer = createMailer(fake.smtpUrl, "Skewsmith <no-reply@skewsmith.invalid>");
    const sending = mailer.send({ to: `nobody@${REFUSED_DOMAIN}`, subject: "Refused", text: "x" });
    await expect(sending).rejects.toMatchObject({ responseCode: 550 });
    mailer.close();
    expect(fake.messages().filter((m) => m.subject === "Refused")).toEqual([]);
  });
});
