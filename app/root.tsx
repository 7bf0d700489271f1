import "@fontsource/inter/400.css";
import "@fontsource/inter/500.css";
import "@fontsource/inter/600.css";
import "@fontsource/jetbrains-mono/400.css";
import "@fontsource/jetbrains-mono/600.css";
import "./app.css";

import {
  Form,
  isRouteErrorResponse,
  Link,
  Links,
  Meta,
  Outlet,
  Scripts,
  ScrollRestoration,
  useMatches,
  useRouteLoaderData,
} from "react-router";
import type { Route } from "./+types/root";
import { buttonClass, Wordmark } from "./components/ui.tsx";
import { env } from "./env.server.ts";
import { getUserFromRequest } from "./guards.server.ts";
import { useNonce } from "./nonce.ts";
import { currentRequestId } from "./requestContext.server.ts";

/** The title of a page without one of its own, and of the error pages. */
export const meta: Route.MetaFunction = ({ error }) => [
  {
    title: error
      ? `${isRouteErrorResponse(error) && error.status === 404 ? "Nothing here" : "Something went wrong"} · Skewsmith`
      : "Skewsmith",
  },
];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUserFromRequest(request);
  return {
    user: user ? { login: user.login, name: user.name } : null,
    mailbox: env().mailboxEnabled,
    /** This request's id: an error page rendered by the server shows it, so a report can be matched to the log. */
    requestId: currentRequestId() ?? null,
  };
}

function Header() {
  const data = useRouteLoaderData<typeof loader>("root");
  const user = data?.user;
  return (
    <header className="border-b border-ink-800 bg-ink-950/90">
      <div className="mx-auto flex max-w-6xl items-center justify-between gap-4 px-6 py-3">
        <Link to="/" aria-label="Skewsmith home" className="rounded-sm">
          <Wordmark />
        </Link>
        {user ? (
          <nav aria-label="Account" className="flex items-center gap-3 text-sm">
            {data?.mailbox ? (
              <Link to="/dev/mailbox" className="text-ink-400 hover:text-glass-300" title="Development only: mail the local server caught">
                Mailbox
              </Link>
            ) : null}
            <Link to="/settings" className="text-ink-400 hover:text-glass-300">
              Settings
            </Link>
            <span className="text-ink-300" data-testid="signed-in-as">
              {user.name ?? user.login} <span className="num text-ink-500">@{user.login}</span>
            </span>
            <Form method="post" action="/sign-out" reloadDocument>
              <button type="submit" className={buttonClass("quiet", "sm")}>
                Sign out
              </button>
            </Form>
          </nav>
        ) : null}
      </div>
    </header>
  );
}

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="color-scheme" content="dark" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen antialiased">
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App() {
  // A route that needs the whole window (the effect bench) says so in its handle.
  const wide = useMatches().some((m) => (m.handle as { wide?: boolean } | undefined)?.wide);
  return (
    <>
      <Header />
      <main className={wide ? "mx-auto max-w-[1600px] px-4 py-6" : "mx-auto max-w-6xl px-6 py-8"}>
        <Outlet />
      </main>
    </>
  );
}

const EXPLAIN = new Map<number, { title: string; next: string }>([
  [400, { title: "That request was not understood", next: "Go back, check the form and try again." }],
  [403, { title: "Your role does not allow this", next: "Ask an owner of the team to change your role if you need to." }],
  [404, { title: "Nothing here", next: "The link may be old, or the thing was archived, deleted or belongs to a team you are not in." }],
  [405, { title: "That is not something this page does", next: "Use the page's own buttons." }],
  [409, { title: "Someone changed this at the same time", next: "Reload the page to see the latest version, then try again." }],
  [413, { title: "That was too much to send", next: "Send less at once." }],
  [415, { title: "That request was not a form", next: "Use the page's own forms." }],
  [429, { title: "Too many attempts", next: "Wait a little and try again." }],
  [
    503,
    {
      title: "Skewsmith cannot reach its database",
      next: "Nothing was lost. Try again in a few seconds; the page works again once the database is back.",
    },
  ],
]);

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const root = useRouteLoaderData<typeof loader>("root");
  let status = 500;
  let message = "Something went wrong on our side. The error was logged; try again in a moment.";
  let title = "Unexpected error";
  let next = "Reload the page; if it keeps happening, tell the team that runs this Skewsmith.";
  // The id of the request that failed: carried by the error (every error a route throws gets it), else, for a page
  // the server rendered, the id of that request.
  let reference: string | null = root?.requestId ?? null;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const explained = EXPLAIN.get(status);
    title = explained?.title ?? (error.statusText || title);
    next = explained?.next ?? next;
    const detail = (error.data as { message?: string; requestId?: string } | string | undefined) ?? "";
    message = typeof detail === "string" ? detail || message : (detail.message ?? message);
    if (typeof detail === "object" && typeof detail.requestId === "string") reference = detail.requestId;
  } else if (import.meta.env.DEV && error instanceof Error) {
    message = error.message;
  }
  return (
    <>
      <Header />
      <main className="mx-auto max-w-2xl px-6 py-16">
        <p className="num text-sm text-glass-400">{status}</p>
        <h1 className="mt-1 text-2xl font-semibold">{title}</h1>
        <p className="mt-3 text-ink-200" data-testid="error-message">
          {message}
        </p>
        <p className="mt-2 text-sm text-ink-400">{next}</p>
        {reference ? (
          <p className="mt-4 text-xs text-ink-500" data-testid="error-reference">
            Reference for a report: <span className="num select-all">{reference}</span>
          </p>
        ) : null}
        <p className="mt-6">
          <Link to="/" className={buttonClass("secondary")}>
            Back to your teams
          </Link>
        </p>
      </main>
    </>
  );
}
