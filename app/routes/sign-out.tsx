import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { readForm } from "../http.server.ts";
import { sessionStorage } from "../sessions.server.ts";

export function loader() {
  return redirect("/");
}

/** Ends the session on the server (the row is deleted) and clears the cookie. */
export async function action({ request }: Route.ActionArgs) {
  await readForm(request); // the form carries nothing, but a body that is not a form is refused
  const storage = sessionStorage();
  const session = await storage.getSession(request.headers.get("Cookie"));
  return redirect("/sign-in?signed-out", { headers: { "Set-Cookie": await storage.destroySession(session) } });
}
