import { data, Link } from "react-router";
import type { Route } from "./+types/project.activity";
import { ActivityList } from "../components/ActivityList.tsx";
import { buttonClass, Crumbs, PageTitle, Panel } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { requireProjectRole } from "../guards.server.ts";
import { listProjectActivityPage } from "../models/activity.server.ts";
import { ACTIVITY_KINDS, isActivityKind, KIND_LABELS, type ActivityKind } from "../models/activityKinds.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Activity · ${data?.project.name ?? "Project"} · Skewsmith` }];

/** Largest page number that is read at all; anything longer is refused before the database is asked. */
const PAGE_DIGITS = 6;

function badRequest(message: string): never {
  throw data({ message }, { status: 400 });
}

/**
 * `?page=N` (1 and up, default 1) and `?what=KIND` (one of ACTIVITY_KINDS). Anything else in them is a 400
 * that says what is allowed; a kind is looked up in a Map, so "__proto__" or "constructor" are simply unknown.
 */
function readQuery(url: URL): { page: number; kind: ActivityKind | undefined } {
  const pageText = url.searchParams.get("page");
  let page = 1;
  if (pageText !== null) {
    if (!new RegExp(`^[1-9][0-9]{0,${PAGE_DIGITS - 1}}$`).test(pageText))
      badRequest(`page must be a whole number from 1 up (got “${pageText.slice(0, 40)}”).`);
    page = Number(pageText);
  }
  const what = url.searchParams.get("what");
  let kind: ActivityKind | undefined;
  if (what !== null && what !== "") {
    if (!isActivityKind(what)) badRequest(`what must be one of ${ACTIVITY_KINDS.join(", ")} (got “${what.slice(0, 40)}”).`);
    kind = what;
  }
  return { page, kind };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, project } = await requireProjectRole(request, params.projectId, "viewer");
  const { page, kind } = readQuery(new URL(request.url));
  const result = await listProjectActivityPage(db(), { teamId: team.id, projectId: project.id, kind }, page);
  if (page > result.pages)
    badRequest(`page must be from 1 to ${result.pages} (there ${result.pages === 1 ? "is one page" : `are ${result.pages} pages`}).`);
  return { team: { id: team.id, name: team.name }, project: { id: project.id, name: project.name }, kind: kind ?? null, ...result };
}

export default function ProjectActivity({ loaderData }: Route.ComponentProps) {
  const { team, project, kind, items, page, pages, total } = loaderData;
  const base = `/projects/${project.id}/activity`;
  const href = (p: number, k: string | null = kind) => {
    const query = new URLSearchParams();
    if (k) query.set("what", k);
    if (p > 1) query.set("page", String(p));
    const text = query.toString();
    return text ? `${base}?${text}` : base;
  };
  return (
    <div className="flex flex-col gap-6">
      <div>
        <Crumbs
          items={[
            { label: "Home", to: "/" },
            { label: team.name, to: `/teams/${team.id}` },
            { label: project.name, to: `/projects/${project.id}` },
            { label: "Activity" },
          ]}
        />
        <PageTitle
          title="Activity"
          meta={`Who changed what in ${project.name}, and in ${team.name} as a whole (members, invitations, target profiles), newest first.`}
        />
      </div>
      <nav aria-label="Kinds of change" className="flex flex-wrap gap-2 text-sm">
        {[null, ...ACTIVITY_KINDS].map((k) => {
          const current = k === kind;
          return (
            <Link
              key={k ?? "all"}
              to={href(1, k)}
              aria-current={current ? "page" : undefined}
              className={`rounded-full border px-3 py-1 ${current ? "border-glass-400 text-glass-200" : "border-ink-700 text-ink-300 hover:border-ink-500"}`}
            >
              {k ? KIND_LABELS[k] : "Everything"}
            </Link>
          );
        })}
      </nav>
      <Panel
        title={
          <>
            {kind ? KIND_LABELS[kind] : "Everything"} · <span className="num">{total}</span> change{total === 1 ? "" : "s"}
          </>
        }
        id="activity"
      >
        <ActivityList items={items} />
        {pages > 1 ? (
          <nav aria-label="Pages" className="mt-5 flex flex-wrap items-center justify-between gap-3 border-t border-ink-800 pt-4 text-sm">
            {page > 1 ? (
              <Link to={href(page - 1)} className={buttonClass("secondary", "sm")} rel="prev">
                ← Newer
              </Link>
            ) : (
              <span />
            )}
            <span className="text-ink-400" data-testid="activity-page">
              Page <span className="num">{page}</span> of <span className="num">{pages}</span>
            </span>
            {page < pages ? (
              <Link to={href(page + 1)} className={buttonClass("secondary", "sm")} rel="next">
                Older →
              </Link>
            ) : (
              <span />
            )}
          </nav>
        ) : null}
      </Panel>
    </div>
  );
}
