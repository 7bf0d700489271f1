import { notFound } from "../guards.server.ts";

/** Any address the app does not know: the one 404 answer (see the root error boundary). */
export function loader() {
  notFound();
}

export default function NotFound() {
  return null;
}
