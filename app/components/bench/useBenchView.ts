/**
 * What the preview shows and how a person moves through it: the frame, pass and zoom (kept in the address, replaced
 * rather than pushed, except while playing), playback at a rate, and the keys of the preview canvas.
 */
import { useCallback, useEffect, useState, type KeyboardEvent } from "react";
import { usePlayback } from "../../bench/usePlayback.ts";
import { viewHref, ZOOM_MAX, ZOOM_MIN, type BenchView, type Pass } from "../../bench/view.ts";

/** The view of a track of `frames` frames, starting from `initial` (the address's), playing at `rate` frames a second. */
export function useBenchView(initial: BenchView, frames: number, rate: number) {
  const [view, setView] = useState<BenchView>(initial);
  const [playing, setPlaying] = useState(false);
  const frame = Math.min(view.frame, frames - 1);

  // The address follows the view (replaced, not pushed), except while playing.
  useEffect(() => {
    if (playing) return;
    const href = viewHref(window.location, { ...view, frame });
    if (href !== `${window.location.pathname}${window.location.search}${window.location.hash}`)
      window.history.replaceState(window.history.state, "", href);
  }, [view, frame, playing]);

  const advance = useCallback(
    (steps: number) => setView((v) => ({ ...v, frame: (Math.min(v.frame, frames - 1) + steps) % frames })),
    [frames],
  );
  usePlayback(playing, rate, advance);

  const setFrame = useCallback((f: number) => setView((v) => ({ ...v, frame: Math.max(0, Math.min(frames - 1, f)) })), [frames]);
  const setPass = useCallback((pass: Pass) => setView((v) => ({ ...v, pass })), []);
  const setZoom = useCallback((zoom: number) => setView((v) => ({ ...v, zoom: Math.max(ZOOM_MIN, Math.min(ZOOM_MAX, zoom)) })), []);
  /** Shows frame f and stops playing: what a click on a frame, a row or an arrow key does. */
  const jump = useCallback(
    (f: number) => {
      setPlaying(false);
      setFrame(f);
    },
    [setFrame],
  );

  const onKey = (event: KeyboardEvent<HTMLCanvasElement>) => {
    const actions: Record<string, () => void> = {
      ArrowLeft: () => jump(frame === 0 ? frames - 1 : frame - 1),
      ArrowRight: () => jump((frame + 1) % frames),
      ArrowUp: () => setPass(Math.min(3, view.pass + 1) as Pass),
      ArrowDown: () => setPass(Math.max(0, view.pass - 1) as Pass),
      "+": () => setZoom(view.zoom + 1),
      "=": () => setZoom(view.zoom + 1),
      "-": () => setZoom(view.zoom - 1),
      " ": () => setPlaying((p) => !p),
    };
    const act = actions[event.key];
    if (act) {
      event.preventDefault();
      act();
    }
  };

  return { view, frame, playing, setPlaying, setPass, setZoom, jump, onKey };
}
