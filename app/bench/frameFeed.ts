/**
 * Frames for the preview: the one wanted, from a small cache when it was seen lately, and while playing the next few
 * asked for ahead, so the worker renders frame n + 1 while the page draws frame n and playback costs the page one
 * putImageData per frame. Plain code (no React), shared by the preview's hook and the browser benchmark (bench/).
 */
import type { FrameAnswer, FrameAsk } from "./useBenchWorker.ts";

export interface FeedWant extends FrameAsk {
  /** The worker's load the page has seen; answers of other loads are dropped. */
  generation: number;
  frames: number;
  playing: boolean;
}

export interface FeedOptions {
  /** How many frames after the wanted one are asked for while playing. */
  ahead: number;
  /** What the cache may hold, in bytes of pixels and marks. */
  maxBytes: number;
  /** Called with an answer the feed drops (never the one last shown), so its buffers can go back to the worker. */
  release: (answer: FrameAnswer) => void;
}

const DEFAULTS: FeedOptions = { ahead: 2, maxBytes: 64 * 1024 * 1024, release: () => {} };

const keyOf = (generation: number, a: FrameAsk) =>
  `${generation}|${a.index}|${a.pass}|${a.zoom}|${+a.shade}${+a.wants.marks}${+a.wants.error}${+a.wants.keys}`;

function sizeOf(a: FrameAnswer): number {
  const p = a.picture;
  let bytes = p.rgba.byteLength + (a.display?.pixels.byteLength ?? 0);
  for (const part of [p.wrapped, p.lost, p.error, p.keys]) bytes += part?.byteLength ?? 0;
  return bytes;
}

/** A frame's pixel buffers that can go back to the worker (those not handed back yet). */
export function recyclable(answer: FrameAnswer): ArrayBuffer[] {
  const buffers = [answer.picture.rgba.buffer];
  if (answer.display) buffers.push(answer.display.pixels.buffer);
  return buffers.filter((b) => b.byteLength > 0);
}

export class FrameFeed {
  /** Answers by key, oldest first (a hit moves to the end). */
  private readonly cache = new Map<string, { answer: FrameAnswer; bytes: number }>();
  private bytes = 0;
  private readonly flying = new Set<string>();
  /** Keys whose request failed in this load: not asked again until the wish changes. */
  private readonly failed = new Set<string>();
  private wanted: FeedWant | null = null;
  private shown: string | null = null;
  private generation = Number.NaN;
  private readonly options: FeedOptions;

  constructor(
    private readonly ask: (want: FrameAsk) => Promise<FrameAnswer>,
    private readonly show: (answer: FrameAnswer) => void,
    options: Partial<FeedOptions> = {},
  ) {
    this.options = { ...DEFAULTS, ...options };
  }

  /** The frame the preview should show now; shown at once when cached, else as soon as the worker answers. */
  want(want: FeedWant): void {
    if (want.generation !== this.generation) {
      this.generation = want.generation;
      for (const [key, entry] of this.cache) if (entry.answer.generation !== want.generation) this.drop(key, entry);
      this.failed.clear();
    }
    if (this.wanted && keyOf(want.generation, this.wanted) !== keyOf(want.generation, want)) this.failed.clear();
    this.wanted = want;
    this.pump();
  }

  /** How many answers the cache holds (for tests and the benchmark). */
  get cached(): number {
    return this.cache.size;
  }

  private pump(): void {
    const w = this.wanted;
    if (!w) return;
    const key = keyOf(w.generation, w);
    const hit = this.cache.get(key);
    if (hit) {
      this.cache.delete(key);
      this.cache.set(key, hit);
      if (this.shown !== key) {
        this.shown = key;
        this.show(hit.answer);
      }
    } else this.request(key, w);
    if (!w.playing || w.frames < 2) return;
    for (let i = 1; i <= Math.min(this.options.ahead, w.frames - 1); i++) {
      const next = { ...w, index: (w.index + i) % w.frames };
      const k = keyOf(w.generation, next);
      if (!this.cache.has(k)) this.request(k, next);
    }
  }

  private request(key: string, want: FeedWant): void {
    // At most one more than the frames asked ahead, so scrubbing fast does not queue work the page will not show.
    if (this.flying.has(key) || this.failed.has(key) || this.flying.size > this.options.ahead) return;
    this.flying.add(key);
    const { index, pass, wants, zoom, shade } = want;
    this.ask({ index, pass, wants, zoom, shade }).then(
      (answer) => {
        this.flying.delete(key);
        // A newer load's answer is kept for the wish that will follow it; asking again now would only get it again.
        if (answer.generation >= this.generation) this.store(keyOf(answer.generation, want), answer);
        if (answer.generation <= this.generation) this.pump();
      },
      () => {
        this.flying.delete(key);
        this.failed.add(key);
        this.pump();
      },
    );
  }

  private store(key: string, answer: FrameAnswer): void {
    const old = this.cache.get(key);
    if (old) this.drop(key, old);
    const bytes = sizeOf(answer);
    this.cache.set(key, { answer, bytes });
    this.bytes += bytes;
    // Oldest first out, but never the one just stored, the one wanted or the one on the canvas.
    const keep = this.wanted ? keyOf(this.generation, this.wanted) : key;
    for (const [k, entry] of this.cache) {
      if (this.bytes <= this.options.maxBytes || this.cache.size <= 3) break;
      if (k !== key && k !== keep && k !== this.shown) this.drop(k, entry);
    }
  }

  private drop(key: string, entry: { answer: FrameAnswer; bytes: number }): void {
    this.cache.delete(key);
    this.bytes -= entry.bytes;
    // The frame on the canvas may be drawn again (an overlay turned on), so its pixels stay with the page.
    if (key !== this.shown) this.options.release(entry.answer);
  }
}
