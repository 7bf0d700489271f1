import { redirect } from "react-router";
import type { Route } from "./+types/auth.github";
import { auth } from "../auth.server.ts";
import { formText, readForm } from "../http.server.ts";
import { limitSignIn } from "../rateLimit.server.ts";
import { returnToCookie, safeNext } from "../signin.server.ts";

/** Starting a sign-in is a POST from the sign-in page; a plain visit goes there. */
export function loader() {
  return redirect("/sign-in");
}

/** Sends the browser to GitHub (or the local stand-in) with a fresh state, remembering where to come back to. */
export async function action({ request }: Route.ActionArgs) {
  await limitSignIn(request);
  // The form only says where to come back to; remix-auth copies the request (body included), so read a clone.
  const next = safeNext(formText(await readForm(request.clone()), "next"));
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
