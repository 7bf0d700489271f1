import "@fontsource/inter/400.css";
import "@fontsource/inter/500.css";
import "@fontsource/inter/600.css";
import "@fontsource/jetbrains-mono/400.css";
import "@fontsource/jetbrains-mono/600.css";
import "./app.css";

import { Form, isRouteErrorResponse, Link, Links, Meta, Outlet, Scripts, ScrollRestoration, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/root";
import { buttonClass, Wordmark } from "./components/ui.tsx";
import { env } from "./env.server.ts";
import { getUserFromRequest } from "./guards.server.ts";

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUserFromRequest(request);
  return {
    user: user ? { login: user.login, name: user.name } : null,
    mailbox: env().DEV_MAILBOX_URL !== undefined,
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
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return (
    <>
      <Header />
      <main className="mx-auto max-w-6xl px-6 py-8">
        <Outlet />
      </main>
    </>
  );
}

const EXPLAIN: Record<number, { title: string; next: string }> = {
  400: { title: "That request was not understood", next: "Go back, check the form and try again." },
  403: { title: "Your role does not allow this", next: "Ask an owner of the team to change your role if you need to." },
  404: { title: "Nothing here", next: "The link may be old, or the thing was archived, deleted or belongs to a team you are not in." },
  405: { title: "That is not something this page does", next: "Use the page's own buttons." },
};

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let status = 500;
  let message = "Something went wrong on our side. The error was logged; try again in a moment.";
  let title = "Unexpected error";
  let next = "Reload the page; if it keeps happening, tell the team that runs this Skewsmith.";
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const explained = EXPLAIN[status];
    title = explained?.title ?? (error.statusText || title);
    next = explained?.next ?? next;
    const detail = (error.data as { message?: string } | string | undefined) ?? "";
    message = typeof detail === "string" ? detail || message : (detail.message ?? message);
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
        <p className="mt-6">
          <Link to="/" className={buttonClass("secondary")}>
            Back to your teams
          </Link>
        </p>
      </main>
    </>
  );
}
