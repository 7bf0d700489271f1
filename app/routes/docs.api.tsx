import MarkdownIt from "markdown-it";
import { Link } from "react-router";
import type { Route } from "./+types/docs.api";
import apiReference from "../../docs/api.md?raw";
import { Crumbs } from "../components/ui.tsx";
import { env } from "../env.server.ts";
import { requireUser } from "../guards.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "API reference · Skewsmith" }];

let rendered: string | undefined;

/** docs/api.md as HTML, made once: the page and the repository show the same reference. Raw HTML in it is escaped. */
function referenceHtml(): string {
  rendered ??= new MarkdownIt({ html: false, linkify: false, typographer: false }).render(apiReference);
  return rendered;
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return { html: referenceHtml(), server: new URL(env().APP_URL).origin };
}

export default function ApiReferencePage({ loaderData }: Route.ComponentProps) {
  const { html, server } = loaderData;
  return (
    <div className="flex flex-col gap-6">
      <Crumbs items={[{ label: "Home", to: "/" }, { label: "Settings", to: "/settings" }, { label: "API reference" }]} />
      <aside className="rounded-md border border-ink-700 bg-ink-900 px-4 py-3 text-sm text-ink-300" aria-label="This server">
        On this server, <code className="num text-ink-100">SKEWSMITH_URL={server}</code>. Make a token on your{" "}
        <Link to="/settings" className="text-glass-300 underline hover:text-glass-200">
          settings page
        </Link>{" "}
        and set <code className="num text-ink-100">SKEWSMITH_TOKEN</code> to it.
      </aside>
      <article className="doc" dangerouslySetInnerHTML={{ __html: html }} />
    </div>
  );
}
