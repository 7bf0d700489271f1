import { Form } from "react-router";
import type { Route } from "./+types/dev.mailbox";
import { attempt, unknownIntent } from "../actions.server.ts";
import { Button, Crumbs, EmptyState, FormError, Notice, PageTitle, Panel, Timestamp } from "../components/ui.tsx";
import { env } from "../env.server.ts";
import { notFound, requireUser } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { readDevMailbox, sendMail } from "../mail.server.ts";
import { DomainError } from "../models/errors.ts";
import { displayName } from "../models/users.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Mailbox (development) · Skewsmith" }];

/** The mailbox exists only where the local mail catcher is configured (never beside real SMTP: env.server.ts). */
function requireMailbox() {
  if (!env().mailboxEnabled) notFound();
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  requireMailbox();
  let messages = null;
  let problem = null;
  try {
    messages = await readDevMailbox();
  } catch (error) {
    problem = `The local mail catcher did not answer (${(error as Error).message}). Is it running? scripts/start starts it.`;
  }
  return { messages, problem, email: user.email };
}

/** Sends a test message to the signed-in person, through the same mail path invitations will use. */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  requireMailbox();
  const intent = formText(await readForm(request), "intent");
  if (intent !== "send-test") return unknownIntent(intent);
  return attempt("send-test", async () => {
    if (!user.email) throw new DomainError("Your account shares no e-mail address, so there is nowhere to send a test message.");
    await sendMail({
      to: user.email,
      subject: "Skewsmith test message",
      text: `Hello ${displayName(user)},\n\nThis message went from Skewsmith through SMTP to the local mail catcher.\n`,
    });
    return `Sent a test message to ${user.email}.`;
  });
}

export default function Mailbox({ loaderData, actionData }: Route.ComponentProps) {
  const { messages, problem, email } = loaderData;
  return (
    <div className="flex flex-col gap-6">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: "Mailbox" }]} />
        <PageTitle
          title="Mailbox"
          meta="Development only: every message the app sent, as the local mail server caught it. Nothing leaves this machine."
        />
      </div>
      <Form method="post" className="flex flex-wrap items-center gap-3">
        <Button name="intent" value="send-test" disabled={!email}>
          Send a test message to {email ?? "me"}
        </Button>
        {actionData?.ok ? <Notice>{actionData.message}</Notice> : null}
        <FormError>{actionData && !actionData.ok ? Object.values(actionData.errors)[0] : null}</FormError>
      </Form>
      <FormError>{problem}</FormError>
      <Panel title="Caught messages" id="messages">
        {!messages || messages.length === 0 ? (
          <EmptyState title="No mail yet">Mail the app sends (invitations, for instance) appears here.</EmptyState>
        ) : (
          <ul className="flex flex-col gap-4">
            {messages.map((m) => (
              <li key={m.id} className="rounded-md border border-ink-700 bg-ink-850 p-4" data-testid="caught-mail">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span className="font-medium text-ink-100">{m.subject || "(no subject)"}</span>
                  <Timestamp value={m.receivedAt} />
                </div>
                <div className="mt-1 text-xs text-ink-400">
                  from <span className="num">{m.from}</span> to <span className="num">{m.to.join(", ")}</span>
                </div>
                <pre className="mt-3 whitespace-pre-wrap font-sans text-sm text-ink-200">{m.text}</pre>
              </li>
            ))}
          </ul>
        )}
      </Panel>
    </div>
  );
}
