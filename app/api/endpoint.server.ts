/**
 * One API address: the handlers it has by method, run after the caller is known. A method it does not have is a 405
 * naming the ones it has; whatever a handler throws comes back as a JSON error (see responses.server.ts).
 */
import { authenticate, type ApiCaller } from "./auth.server.ts";
import { answering, ApiError } from "./responses.server.ts";

export type ApiMethod = "GET" | "POST" | "PUT" | "DELETE";

export interface ApiContext {
  readonly request: Request;
  readonly params: Readonly<Record<string, string | undefined>>;
  readonly caller: ApiCaller;
  readonly url: URL;
}

export type ApiHandler = (context: ApiContext) => Promise<Response>;

/** A route module's loader and action for an API address with these handlers. */
export function endpoint(handlers: Partial<Record<ApiMethod, ApiHandler>>) {
  const allowed = Object.keys(handlers) as ApiMethod[];
  const allow = [...allowed, ...(allowed.includes("GET") ? ["HEAD"] : [])].join(", ");
  const handle = ({ request, params }: { request: Request; params: Readonly<Record<string, string | undefined>> }) =>
    answering(async () => {
      const method = (request.method === "HEAD" ? "GET" : request.method) as ApiMethod;
      const handler = Object.hasOwn(handlers, method) ? handlers[method] : undefined;
      if (!handler)
        throw new ApiError(405, `${request.method} is not something this address does; it answers ${allow}.`, {
          headers: { Allow: allow },
        });
      const caller = await authenticate(request);
      return handler({ request, params, caller, url: new URL(request.url) });
    });
  return { loader: handle, action: handle };
}
