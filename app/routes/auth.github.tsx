import { redirect } from "react-router";
import type { Route } from "./+types/auth.github";
import { auth } from "../auth.server.ts";
import { returnToCookie, safeNext } from "../signin.server.ts";

/** Starting a sign-in is a POST from the sign-in page; a plain visit goes there. */
export function loader() {
  return redirect("/sign-in");
}

/** Sends the browser to GitHub (or the local stand-in) with a fresh state, remembering where to come back to. */
export async function action({ request }: Route.ActionArgs) {
  const form = await request.clone().formData();
  const next = safeNext(form.get("next"));
  try {
    await auth().authenticate("github", request);
  } catch (thrown) {
    if (thrown instanceof Response && thrown.status >= 300 && thrown.status < 400) {
      const headers = new Headers(thrown.headers);
      headers.append("Set-Cookie", await returnToCookie().serialize(next));
      return new Response(null, { status: thrown.status, headers });
    }
    throw thrown;
  }
  return redirect("/sign-in");
}
