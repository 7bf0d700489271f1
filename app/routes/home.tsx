import { Link } from "react-router";
import type { Route } from "./+types/home";
import { CreateTeamForm } from "../components/CreateTeamForm.tsx";
import { ColumnHeader, EmptyState, PageTitle, Panel, RoleBadge, TABLE, TCELL, THEAD, TROW, Timestamp } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { requireUser } from "../guards.server.ts";
import { listProjectsForUser } from "../models/projects.server.ts";
import { listTeamsForUser } from "../models/teams.server.ts";
import { displayName } from "../models/users.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Your teams · Skewsmith" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const [teams, projects] = await Promise.all([listTeamsForUser(db(), user.id), listProjectsForUser(db(), user.id)]);
  return { name: displayName(user), teams, projects };
}

export default function Home({ loaderData }: Route.ComponentProps) {
  const { name, teams, projects } = loaderData;
  return (
    <div className="flex flex-col gap-8">
      <PageTitle title={`Hello, ${name}`} meta="Your teams and their projects, with your role in each." />

      {teams.length === 0 ? (
        <Panel title="Start with a team" id="start">
          <p className="mb-4 text-sm text-ink-300">
            You are not in a team yet. Projects, effects, sprites and target profiles all belong to a team. Create one here, or ask an owner
            of an existing team to invite you by e-mail.
          </p>
          <CreateTeamForm />
        </Panel>
      ) : (
        <>
          <Panel title="Teams" id="teams">
            <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
              {teams.map((t) => (
                <li key={t.id}>
                  <Link
                    to={`/teams/${t.id}`}
                    className="flex h-full flex-col gap-2 rounded-md border border-ink-700 bg-ink-850 px-4 py-3 hover:border-glass-500"
                  >
                    <span className="flex items-center justify-between gap-2">
                      <span className="font-medium text-ink-100">{t.name}</span>
                      <RoleBadge role={t.role} />
                    </span>
                    <span className="text-xs text-ink-400">
                      <span className="num">{t.memberCount}</span> member{t.memberCount === 1 ? "" : "s"} ·{" "}
                      <span className="num">{t.projectCount}</span> project{t.projectCount === 1 ? "" : "s"}
                    </span>
                  </Link>
                </li>
              ))}
            </ul>
          </Panel>

          <Panel title="Projects" id="projects">
            {projects.length === 0 ? (
              <EmptyState title="No projects yet">Open a team and create its first project; editors and owners can.</EmptyState>
            ) : (
              <table className={TABLE}>
                <thead className={THEAD}>
                  <tr>
                    <ColumnHeader label="Project" />
                    <ColumnHeader label="Team" />
                    <ColumnHeader label="Your role" />
                    <ColumnHeader label="Effects" align="right" />
                    <ColumnHeader label="Last change" />
                  </tr>
                </thead>
                <tbody>
                  {projects.map((p) => (
                    <tr key={p.id} className={TROW}>
                      <td className={TCELL}>
                        <Link to={`/projects/${p.id}`} className="font-medium text-ink-100 hover:text-glass-300">
                          {p.name}
                        </Link>
                      </td>
                      <td className={TCELL}>
                        <Link to={`/teams/${p.teamId}`} className="text-ink-300 hover:text-glass-300">
                          {p.teamName}
                        </Link>
                      </td>
                      <td className={TCELL}>
                        <RoleBadge role={p.role} />
                      </td>
                      <td className={`${TCELL} num text-right`}>{p.effectCount}</td>
                      <td className={TCELL}>
                        <Timestamp value={p.lastChangedAt} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Panel>

          <Panel title="Create another team" id="new-team">
            <CreateTeamForm />
          </Panel>
        </>
      )}
    </div>
  );
}
