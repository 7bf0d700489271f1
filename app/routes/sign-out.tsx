import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { readForm } from "../http.server.ts";
import { sessionStorage } from "../sessions.server.ts";
import { safeNext } from "../signin.server.ts";

export function loader() {
  return redirect("/");
}

/** Ends the session on the server (the row is deleted) and clears the cookie; `next` (a path of this app) is where signing in again leads. */
export async function action({ request }: Route.ActionArgs) {
  const form = await readForm(request);
  const next = safeNext(form.get("next"));
  const storage = sessionStorage();
  const session = await storage.getSession(request.headers.get("Cookie"));
  const to = next === "/" ? "/sign-in?signed-out" : `/sign-in?signed-out&next=${encodeURIComponent(next)}`;
  return redirect(to, { headers: { "Set-Cookie": await storage.destroySession(session) } });
}
