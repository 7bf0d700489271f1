import type { Route } from "./+types/project.export";
import { answering } from "../api/responses.server.ts";
import { db } from "../db.server.ts";
import { exportQuery, exportResponse, planProjectExport, projectExportSources } from "../exports.server.ts";
import { requireProjectRole } from "../guards.server.ts";

/** The export bundle of every live effect of the project (zip, one folder per effect), with the query's options. */
export async function loader({ request, params }: Route.LoaderArgs) {
  return answering(
    async () => {
      const { project } = await requireProjectRole(request, params.projectId, "viewer");
      const query = exportQuery(new URL(request.url).searchParams);
      const plan = planProjectExport(project, await projectExportSources(db(), project), query);
      return exportResponse(request, plan);
    },
    { redirects: true },
  );
}
