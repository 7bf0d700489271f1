import { Form, redirect } from "react-router";
import type { Route } from "./+types/sign-in";
import { buttonClass, FormError, LogoMark, Notice } from "../components/ui.tsx";
import { DEMO_PEOPLE, DEMO_TEAM } from "../demo/people.ts";
import { env } from "../env.server.ts";
import { getUserFromRequest } from "../guards.server.ts";
import { safeNext, signInErrorMessage } from "../signin.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Skewsmith" }];

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const next = safeNext(url.searchParams.get("next"));
  if (await getUserFromRequest(request)) throw redirect(next);
  const error = url.searchParams.get("error");
  return {
    next,
    error: error ? signInErrorMessage(error) : null,
    signedOut: url.searchParams.has("signed-out"),
    demo: env().usesFakeGitHub ? DEMO_PEOPLE.map((p) => ({ name: p.name, login: p.login, role: p.role })) : null,
  };
}

export default function SignIn({ loaderData }: Route.ComponentProps) {
  const { next, error, signedOut, demo } = loaderData;
  return (
    <div className="mx-auto mt-8 max-w-md">
      <div className="rounded-xl border border-ink-700 bg-ink-900 px-8 py-9">
        <LogoMark className="h-10 w-10" />
        <h1 className="mt-4 text-2xl font-semibold tracking-tight">Sign in to Skewsmith</h1>
        <p className="mt-2 text-sm text-ink-300">
          Shift tables for rotating sprites and backgrounds on hardware that can only move rows and columns, shared with your team.
        </p>
        <div className="mt-6 flex flex-col gap-3">
          {signedOut ? <Notice>You are signed out. Your session has ended on the server too.</Notice> : null}
          <FormError>{error}</FormError>
          <Form method="post" action="/auth/github" reloadDocument>
            <input type="hidden" name="next" value={next} />
            <button type="submit" className={buttonClass("primary") + " w-full py-2.5"}>
              Sign in with GitHub
            </button>
          </Form>
        </div>
      </div>
      {demo ? (
        <div className="mt-5 rounded-lg border border-ink-700 px-6 py-4 text-sm text-ink-300">
          <p>
            <span className="font-medium text-ink-100">Development:</span> sign-in goes to a local stand-in for GitHub, where you choose one
            of these demo accounts:
          </p>
          <ul className="mt-2 space-y-1">
            {demo.map((p) => (
              <li key={p.login} className="flex justify-between gap-3">
                <span>
                  {p.name} <span className="num text-ink-500">@{p.login}</span>
                </span>
                <span className="text-ink-400">{p.role ? `${p.role} of ${DEMO_TEAM.name}` : "no team yet"}</span>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
    </div>
  );
}
