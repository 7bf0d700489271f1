/**
 * The module a Node diagnostics worker runs (started by ./nodePool.ts): it joins the shared tracks the pool posts
 * (./sharedTrack.ts), and answers every other request on its port with the same handler a browser worker runs
 * (serveDiagnostics); after every message it posts it bumps the shared counter `signal`.
 */
import type { MessagePort } from "node:worker_threads";
import { diagnoseFrames } from "./diagnoseFrames.ts";
import { WORKER_READY } from "./nodePool.ts";
import { serveDiagnostics } from "./protocol.ts";
import { takeRanges, TRACK_REQUEST, type TrackRequest } from "./sharedTrack.ts";

/** Serves diagnostics requests arriving on `port`; `signal[0]` is bumped (and waiters woken) after every message posted. */
export function serveWorkerPort(port: MessagePort, signal: Int32Array): void {
  const post = (message: unknown, transfer: ArrayBuffer[]) => {
    port.postMessage(message, transfer);
    Atomics.add(signal, 0, 1);
    Atomics.notify(signal, 0);
  };
  port.on("message", (data: unknown) => {
    const track = data as Partial<TrackRequest> | null;
    if (track?.type === TRACK_REQUEST) {
      const t = track as TrackRequest;
      takeRanges(t, (range) => diagnoseFrames(t.effect, range, t.mask), true);
    } else listeners.forEach((l) => l({ data }));
  });
  const listeners: ((event: { readonly data: unknown }) => void)[] = [];
  serveDiagnostics({ addEventListener: (_type, listener) => void listeners.push(listener), postMessage: post });
  post({ type: WORKER_READY }, []);
}
