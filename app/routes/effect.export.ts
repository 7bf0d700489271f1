import type { Route } from "./+types/effect.export";
import { answering, ApiError } from "../api/responses.server.ts";
import { db } from "../db.server.ts";
import { effectExportSource, exportQuery, exportResponse, planEffectExport } from "../exports.server.ts";
import { requireEffectRole } from "../guards.server.ts";

/** The export bundle of the saved effect (zip), with the options of the query over its target profile's defaults. */
export async function loader({ request, params }: Route.LoaderArgs) {
  return answering(
    async () => {
      const { effect } = await requireEffectRole(request, params.effectId, "viewer");
      if (effect.deletedAt) throw new ApiError(404, "This effect was deleted; restore it on the project page to export it.");
      const plan = planEffectExport(await effectExportSource(db(), effect), exportQuery(new URL(request.url).searchParams));
      return exportResponse(request, plan);
    },
    { redirects: true },
  );
}
