import { describe, expect, it } from "vitest";
import type { FramePicture } from "./framePainter.ts";
import { FrameFeed, recyclable, type FeedWant } from "./frameFeed.ts";
import type { FrameAnswer, FrameAsk } from "./useBenchWorker.ts";

/** A stand-in worker: answers are held until the test lets them go, so the order of events is the test's. */
function fakeWorker(generation = () => 1) {
  const asked: FrameAsk[] = [];
  const waiting: { ask: FrameAsk; resolve: (a: FrameAnswer) => void; reject: (e: Error) => void }[] = [];
  const ask = (a: FrameAsk) =>
    new Promise<FrameAnswer>((resolve, reject) => {
      asked.push(a);
      waiting.push({ ask: a, resolve, reject });
    });
  const answer = (a: FrameAsk, bytes = 16): FrameAnswer => ({
    index: a.index,
    pass: a.pass,
    degrees: a.index,
    generation: generation(),
    picture: { rgba: new Uint8ClampedArray(bytes) } as unknown as FramePicture,
    display: { zoom: a.zoom, shaded: a.shade, pixels: new Uint8ClampedArray(bytes * a.zoom * a.zoom) },
  });
  const flush = async (bytes?: number) => {
    while (waiting.length > 0) {
      const w = waiting.shift()!;
      w.resolve(answer(w.ask, bytes));
      await Promise.resolve();
      await Promise.resolve();
    }
  };
  const fail = async () => {
    const w = waiting.shift()!;
    w.reject(new Error("no"));
    await Promise.resolve();
    await Promise.resolve();
  };
  return { ask, asked, waiting, flush, fail };
}

const want = (index: number, more: Partial<FeedWant> = {}): FeedWant => ({
  index,
  pass: 3,
  zoom: 2,
  shade: false,
  wants: { marks: false, error: false, keys: false },
  generation: 1,
  frames: 10,
  playing: false,
  ...more,
});

describe("FrameFeed", () => {
  it("shows a frame once, from the cache the second time without asking again", async () => {
    const w = fakeWorker();
    const shown: number[] = [];
    const feed = new FrameFeed(w.ask, (a) => shown.push(a.index));
    feed.want(want(3));
    await w.flush();
    feed.want(want(4));
    await w.flush();
    feed.want(want(3));
    expect(shown).toEqual([3, 4, 3]);
    expect(w.asked.map((a) => a.index)).toEqual([3, 4]);
  });

  it("asks for the next frames ahead while playing, wrapping at the end of the track", async () => {
    const w = fakeWorker();
    const feed = new FrameFeed(w.ask, () => {}, { ahead: 2 });
    feed.want(want(8, { playing: true }));
    expect(w.asked.map((a) => a.index)).toEqual([8, 9, 0]);
    await w.flush();
    feed.want(want(9, { playing: true }));
    // 9 and 0 are cached; only 1 is new.
    expect(w.asked.map((a) => a.index)).toEqual([8, 9, 0, 1]);
  });

  it("keeps no more than one request beyond those ahead, so fast scrubbing does not pile up work", () => {
    const w = fakeWorker();
    const feed = new FrameFeed(w.ask, () => {}, { ahead: 2 });
    for (let i = 0; i < 10; i++) feed.want(want(i));
    expect(w.asked.map((a) => a.index)).toEqual([0, 1, 2]);
  });

  it("asks again once a slot frees, for the frame wanted last", async () => {
    const w = fakeWorker();
    const shown: number[] = [];
    const feed = new FrameFeed(w.ask, (a) => shown.push(a.index), { ahead: 0 });
    feed.want(want(0));
    feed.want(want(5));
    feed.want(want(7));
    await w.flush();
    expect(w.asked.map((a) => a.index)).toEqual([0, 7]);
    expect(shown).toEqual([7]);
  });

  it("hands dropped frames' buffers back, never the one on the canvas", async () => {
    const w = fakeWorker();
    const released: number[] = [];
    const shown: number[] = [];
    // Each answer is 16 + 64 bytes; room for three.
    const feed = new FrameFeed(w.ask, (a) => shown.push(a.index), { ahead: 0, maxBytes: 240, release: (a) => released.push(a.index) });
    for (let i = 0; i < 6; i++) {
      feed.want(want(i));
      await w.flush();
    }
    expect(shown).toEqual([0, 1, 2, 3, 4, 5]);
    expect(released).toEqual([0, 1, 2]);
    expect(feed.cached).toBe(3);
  });

  it("drops the answers of an older load, and does not show an old load's frame for the new one", async () => {
    let generation = 1;
    const w = fakeWorker(() => generation);
    const released: number[] = [];
    const shown: string[] = [];
    const feed = new FrameFeed(w.ask, (a) => shown.push(`${a.generation}:${a.index}`), { release: (a) => released.push(a.index) });
    feed.want(want(1));
    await w.flush();
    feed.want(want(2));
    await w.flush();
    generation = 2;
    feed.want(want(1, { generation: 2 }));
    expect(released).toEqual([1]); // frame 2 is on the canvas, so it stays with the page
    await w.flush();
    expect(shown).toEqual(["1:1", "1:2", "2:1"]);
  });

  it("does not ask again and again for a frame that failed, until the wish changes", async () => {
    const w = fakeWorker();
    const feed = new FrameFeed(w.ask, () => {});
    feed.want(want(4));
    await w.fail();
    expect(w.asked.length).toBe(1);
    feed.want(want(5));
    feed.want(want(4));
    expect(w.asked.map((a) => a.index)).toEqual([4, 5, 4]);
  });

  it("lists only buffers not handed back yet", () => {
    const a = {
      picture: { rgba: new Uint8ClampedArray(8) },
      display: { zoom: 1, shaded: false, pixels: new Uint8ClampedArray(8) },
    } as unknown as FrameAnswer;
    expect(recyclable(a).length).toBe(2);
    structuredClone(a.picture.rgba.buffer, { transfer: [a.picture.rgba.buffer] });
    expect(recyclable(a)).toEqual([a.display!.pixels.buffer]);
  });
});
