import { data } from "react-router";
import type { Route } from "./+types/not-found";

export const meta: Route.MetaFunction = () => [{ title: "Nothing here · Skewsmith" }];

/** Any address the app does not know: a 404 with the usual explanation (see the root error boundary). */
export function loader() {
  throw data({ message: "There is no page at this address." }, { status: 404 });
}

export default function NotFound() {
  return null;
}
