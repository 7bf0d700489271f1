/** The preview's frames as React state, through a FrameFeed (cache and frames asked ahead while playing). */
import { useEffect, useState } from "react";
import { FrameFeed, type FeedWant } from "./frameFeed.ts";
import type { FrameAnswer, FrameAsk } from "./useBenchWorker.ts";

export function useFrameFeed(
  ask: (want: FrameAsk) => Promise<FrameAnswer>,
  release: (answer: FrameAnswer) => void,
  want: FeedWant | null,
): FrameAnswer | null {
  const [answer, setAnswer] = useState<FrameAnswer | null>(null);
  const [feed] = useState(() => new FrameFeed(ask, setAnswer, { release }));
  const key = want ? JSON.stringify(want) : null;
  useEffect(() => {
    if (want) feed.want(want);
    // The key holds every part of the wish.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [feed, key]);
  return answer;
}
