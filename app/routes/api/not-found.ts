import { answering, ApiError } from "../../api/responses.server.ts";

/** Any other address under /api/v1: a JSON 404, never the app's HTML page. */
async function notFound({ request }: { request: Request }) {
  return answering(async () => {
    const path = new URL(request.url).pathname;
    throw new ApiError(404, `There is no API address ${path.slice(0, 200)}. The API reference is at /docs/api.`);
  });
}

export const loader = notFound;
export const action = notFound;
