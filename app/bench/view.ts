/** The bench's view in the address: `?frame=N&pass=P&zoom=Z`, so a teammate can be sent a link to one frame. */

export const PASSES = [0, 1, 2, 3] as const;
export type Pass = (typeof PASSES)[number];

/** What each pass shows, in the product's words. */
export const PASS_LABELS: Record<Pass, string> = {
  0: "Source placed in the canvas",
  1: "After the first row pass",
  2: "After the column pass",
  3: "After the second row pass (the frame)",
};

export const ZOOM_MIN = 1;
export const ZOOM_MAX = 16;

export interface BenchView {
  frame: number;
  pass: Pass;
  zoom: number;
}

/** The zoom that shows the canvas at about `room` pixels wide and `roomY` high, whole numbers only. */
export function fitZoom(canvas: { width: number; height: number }, room = 512, roomY = 400): number {
  return Math.max(ZOOM_MIN, Math.min(ZOOM_MAX, Math.floor(Math.min(room / canvas.width, roomY / canvas.height))));
}

function whole(text: string | null, min: number, max: number): number | null {
  if (text === null || !/^\d{1,6}$/.test(text)) return null;
  const n = Number(text);
  return n >= min && n <= max ? n : null;
}

/** The view a search string asks for, each value checked; a missing or bad one takes the default (never an error). */
export function viewFromSearch(search: URLSearchParams, frames: number, canvas: { width: number; height: number }): BenchView {
  return {
    frame: whole(search.get("frame"), 0, Math.max(0, frames - 1)) ?? 0,
    pass: (whole(search.get("pass"), 0, 3) ?? 3) as Pass,
    zoom: whole(search.get("zoom"), ZOOM_MIN, ZOOM_MAX) ?? fitZoom(canvas),
  };
}

/** The address of a view: the page's own path with frame, pass and zoom (other parameters kept). */
export function viewHref(location: { pathname: string; search: string; hash?: string }, view: BenchView): string {
  const search = new URLSearchParams(location.search);
  search.set("frame", String(view.frame));
  search.set("pass", String(view.pass));
  search.set("zoom", String(view.zoom));
  return `${location.pathname}?${search.toString()}${location.hash ?? ""}`;
}
