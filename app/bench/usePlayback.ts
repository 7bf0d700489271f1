/** The preview's playback: the frame advances at the chosen rate, held lower while the system asks for reduced motion. */
import { useEffect, useSyncExternalStore } from "react";

const REDUCED_MOTION = "(prefers-reduced-motion: reduce)";

/** Whether the system asks for reduced motion (false on the server, where there is no system to ask). */
export function useReducedMotion(): boolean {
  return useSyncExternalStore(
    (change) => {
      const query = window.matchMedia(REDUCED_MOTION);
      query.addEventListener("change", change);
      return () => query.removeEventListener("change", change);
    },
    () => window.matchMedia(REDUCED_MOTION).matches,
    () => false,
  );
}

/**
 * While `playing`, calls `advance(steps)` on animation frames with the whole frames due at `rate` per second since the
 * last step (more than one when the page fell behind, so playback keeps time rather than slowing down).
 */
export function usePlayback(playing: boolean, rate: number, advance: (steps: number) => void): void {
  useEffect(() => {
    if (!playing) return;
    let last = performance.now();
    let id = requestAnimationFrame(function tick(now) {
      const steps = Math.floor(((now - last) * rate) / 1000);
      if (steps > 0) {
        last += (steps * 1000) / rate;
        advance(steps);
      }
      id = requestAnimationFrame(tick);
    });
    return () => cancelAnimationFrame(id);
  }, [playing, rate, advance]);
}
