import { useState } from "react";
import { data, Link, useFetcher } from "react-router";
import type { Route } from "./+types/settings";
import { attempt, invalid, unknownIntent } from "../actions.server.ts";
import { InlineCreateForm } from "../components/InlineCreateForm.tsx";
import { useFormCheck } from "../components/useFormCheck.ts";
import {
  ActionsHeader,
  Button,
  ColumnHeader,
  Counted,
  EmptyState,
  Field,
  Notice,
  PageTitle,
  Panel,
  Select,
  TABLE,
  TCELL,
  TextInput,
  THEAD,
  TROW,
  Timestamp,
  buttonClass,
} from "../components/ui.tsx";
import { db } from "../db.server.ts";
import {
  createTokenForm,
  DEFAULT_TOKEN_LIFETIME,
  errorsFor,
  NAME_MAX,
  parseForm,
  revokeTokenForm,
  TOKEN_LIFETIMES,
  type ActionResult,
} from "../forms.ts";
import { requireUser } from "../guards.server.ts";
import { readForm } from "../http.server.ts";
import { createApiToken, listApiTokens, revokeApiToken } from "../models/apiTokens.server.ts";
import { displayName } from "../models/users.server.ts";
import { SCOPE_SUMMARY, TOKEN_SCOPES } from "../tokens.ts";

export const meta: Route.MetaFunction = () => [{ title: "Settings · Skewsmith" }];

/** A new token is on this page once: no cache may keep it. */
export const headers: Route.HeadersFunction = () => ({ "Cache-Control": "private, no-store" });

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const tokens = await listApiTokens(db(), user.id);
  return { me: { name: displayName(user), login: user.login }, tokens, now: new Date().toISOString() };
}

/** What the action answers after making a token: the secret, this once. */
type Created = { ok: true; intent: "create-token"; created: { id: string; name: string; scope: string; secret: string } };

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await readForm(request);
  const intent = form.get("intent");
  switch (intent) {
    case "create-token": {
      const parsed = parseForm(createTokenForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      const { name, scope, expiresInDays } = parsed.data;
      const expiresAt = expiresInDays === null ? null : new Date(Date.now() + expiresInDays * 24 * 60 * 60 * 1000);
      let created: Created["created"] | undefined;
      const result = await attempt(intent, async () => {
        const made = await createApiToken(db(), { userId: user.id, name, scope, expiresAt });
        created = { id: made.item.id, name: made.item.name, scope: made.item.scope, secret: made.token };
      });
      return created ? data<Created>({ ok: true, intent, created }, { headers: { "Cache-Control": "private, no-store" } }) : result;
    }
    case "revoke-token": {
      const parsed = parseForm(revokeTokenForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(
        intent,
        async () => {
          const revoked = await revokeApiToken(db(), { userId: user.id, tokenId: parsed.data.tokenId });
          return `Revoked the token ${revoked.name}: anything still using it is now refused.`;
        },
        parsed.data.tokenId,
      );
    }
    default:
      return unknownIntent(intent);
  }
}

type Token = Route.ComponentProps["loaderData"]["tokens"][number];

function stateOf(token: Token, now: string): "live" | "revoked" | "expired" {
  if (token.revokedAt) return "revoked";
  if (token.expiresAt && new Date(token.expiresAt).getTime() <= new Date(now).getTime()) return "expired";
  return "live";
}

/** The new token, shown once, with a copy button and how to use it. */
function NewToken({ created }: { created: Created["created"] }) {
  const [copied, setCopied] = useState<"no" | "yes" | "failed">("no");
  async function copy() {
    try {
      await navigator.clipboard.writeText(created.secret);
      setCopied("yes");
    } catch {
      setCopied("failed");
    }
  }
  return (
    <div className="rounded-md border border-glass-600 bg-glass-900/60 px-4 py-3 text-sm text-glass-100" data-testid="new-token">
      <p className="font-medium">
        Your new {created.scope} token “{created.name}”. Copy it now: it is shown only this once.
      </p>
      <div className="mt-2 flex flex-wrap items-center gap-2">
        <label htmlFor="new-token-value" className="sr-only">
          New token
        </label>
        <input
          id="new-token-value"
          readOnly
          value={created.secret}
          onFocus={(e) => e.currentTarget.select()}
          className="num min-w-0 flex-1 rounded-md border border-ink-600 bg-ink-950 px-3 py-2 text-sm text-ink-100"
        />
        <button type="button" onClick={copy} className={buttonClass("secondary")}>
          Copy
        </button>
        <span role="status" className="text-xs text-glass-200">
          {copied === "yes" ? "Copied." : copied === "failed" ? "Copying was refused; select the text and copy it yourself." : ""}
        </span>
      </div>
      <p className="mt-2 text-xs text-glass-200">
        Send it as <code className="num">Authorization: Bearer …</code>, or keep it in <code className="num">SKEWSMITH_TOKEN</code> for{" "}
        <code className="num">skewsmith pull</code>. Treat it like a password.
      </p>
    </div>
  );
}

function TokenRow({ token, now }: { token: Token; now: string }) {
  const fetcher = useFetcher<ActionResult>({ key: `revoke-${token.id}` });
  const [confirming, setConfirming] = useState(false);
  const state = stateOf(token, now);
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : undefined;
  const busy = fetcher.state !== "idle";
  return (
    <tr className={`${TROW} ${state === "live" ? "" : "text-ink-500"}`} data-testid={`token-${token.name}`}>
      <td className={TCELL}>
        <span className={state === "live" ? "font-medium text-ink-100" : "text-ink-400 line-through decoration-ink-600"}>{token.name}</span>
      </td>
      <td className={TCELL}>
        <span className="num text-xs">{token.scope}</span>
      </td>
      <td className={TCELL}>
        <Timestamp value={token.createdAt} />
      </td>
      <td className={TCELL}>{token.lastUsedAt ? <Timestamp value={token.lastUsedAt} /> : <span className="text-ink-500">never</span>}</td>
      <td className={TCELL}>
        {state === "revoked" ? (
          <span>
            revoked <Timestamp value={token.revokedAt!} />
          </span>
        ) : token.expiresAt ? (
          <span>
            {state === "expired" ? "expired " : ""}
            <Timestamp value={token.expiresAt} />
          </span>
        ) : (
          <span className="text-ink-400">when revoked</span>
        )}
      </td>
      <td className={`${TCELL} text-right`}>
        {state !== "live" ? null : confirming ? (
          <fetcher.Form method="post" className="flex items-center justify-end gap-2" aria-label={`Revoke ${token.name}`}>
            <input type="hidden" name="tokenId" value={token.id} />
            <span className="text-xs text-ink-300">Anything using it stops working.</span>
            <Button size="sm" variant="danger" name="intent" value="revoke-token" disabled={busy}>
              Revoke now
            </Button>
            <button type="button" className={buttonClass("quiet", "sm")} onClick={() => setConfirming(false)}>
              Keep
            </button>
          </fetcher.Form>
        ) : (
          <button type="button" className={buttonClass("danger", "sm")} onClick={() => setConfirming(true)}>
            Revoke…
          </button>
        )}
        {error ? (
          <p className="mt-1 text-xs text-alert-300" role="alert">
            {error}
          </p>
        ) : null}
      </td>
    </tr>
  );
}

export default function SettingsPage({ loaderData, actionData }: Route.ComponentProps) {
  const { me, tokens, now } = loaderData;
  const check = useFormCheck(createTokenForm);
  const answer = actionData as (Created | ActionResult) | undefined;
  const errors = check.errors ?? errorsFor(answer as ActionResult | undefined, "create-token");
  const created = answer?.ok && "created" in answer ? answer.created : undefined;
  const live = tokens.filter((t) => stateOf(t, now) === "live").length;
  return (
    <div className="flex flex-col gap-8">
      <PageTitle
        title="Settings"
        meta={
          <span>
            {me.name} <span className="num text-ink-500">@{me.login}</span>
          </span>
        }
      />
      <Panel title={<Counted label="API tokens" count={live} />} id="tokens">
        <div className="flex flex-col gap-4">
          <p className="max-w-3xl text-sm text-ink-300">
            A token lets a build or a script use Skewsmith as you: <code className="num">skewsmith pull</code> in a Makefile, or the JSON
            API with curl. It reaches the teams you are in, with your role there, and no more than its scope allows. See the{" "}
            <Link to="/docs/api" className="text-glass-300 underline hover:text-glass-200">
              API reference
            </Link>
            .
          </p>
          <ul className="grid gap-1 text-sm text-ink-400 sm:grid-cols-2">
            {TOKEN_SCOPES.map((s) => (
              <li key={s}>
                <span className="num text-ink-200">{s}</span>: {SCOPE_SUMMARY[s]}
              </li>
            ))}
          </ul>
          {created ? <NewToken created={created} /> : null}
          {answer?.ok && answer.intent === "revoke-token" && "message" in answer && answer.message ? (
            <Notice>{answer.message}</Notice>
          ) : null}
          {tokens.length === 0 ? (
            <EmptyState title="No tokens yet">Create one below for your build; you will see it once, then only its name.</EmptyState>
          ) : (
            <div className="overflow-x-auto">
              <table className={TABLE} data-testid="tokens-table">
                <thead className={THEAD}>
                  <tr>
                    <ColumnHeader label="Name" />
                    <ColumnHeader label="Scope" />
                    <ColumnHeader label="Created" />
                    <ColumnHeader label="Last used" />
                    <ColumnHeader label="Expires" />
                    <ActionsHeader />
                  </tr>
                </thead>
                <tbody>
                  {tokens.map((t) => (
                    <TokenRow key={t.id} token={t} now={now} />
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
        <InlineCreateForm
          key={created?.id ?? "new"}
          label="New API token"
          columns="md:grid-cols-[2fr_1fr_1fr_auto]"
          intent="create-token"
          submit="Create token"
          onSubmit={check.onSubmit}
          formError={errors?.form}
        >
          <Field label="Token name" name="token-name" error={errors?.name}>
            <TextInput id="token-name" name="name" maxLength={NAME_MAX} required placeholder="Say, build server" error={errors?.name} />
          </Field>
          <Field label="Scope" name="token-scope" error={errors?.scope}>
            <Select id="token-scope" name="scope" defaultValue="read" error={errors?.scope}>
              {TOKEN_SCOPES.map((s) => (
                <option key={s} value={s}>
                  {s}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Expires after" name="token-expires" error={errors?.expiresInDays}>
            <Select id="token-expires" name="expiresInDays" defaultValue={String(DEFAULT_TOKEN_LIFETIME)} error={errors?.expiresInDays}>
              {TOKEN_LIFETIMES.map((d) => (
                <option key={d} value={d}>
                  {d} days
                </option>
              ))}
              <option value="never">never (until revoked)</option>
            </Select>
          </Field>
        </InlineCreateForm>
      </Panel>
    </div>
  );
}
