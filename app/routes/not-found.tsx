import type { Route } from "./+types/not-found";
import { notFound } from "../guards.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Nothing here · Skewsmith" }];

/** Any address the app does not know: the one 404 answer (see the root error boundary). */
export function loader() {
  notFound();
}

export default function NotFound() {
  return null;
}
