// Shared by the benchmarks: the median of a case's rounds, and a full garbage collection before each timed case.
import v8 from "node:v8";
import vm from "node:vm";

v8.setFlagsFromString("--expose-gc");
/** A full collection, run outside the timing before every case, so no case pays for another's garbage. */
export const collectGarbage = vm.runInNewContext("gc") as () => void;

/** The median of the rounds' times. */
export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
