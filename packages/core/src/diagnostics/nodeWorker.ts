/**
 * The module a Node diagnostics worker runs (started by ./nodePool.ts): it answers requests on its port with the same
 * handler a browser worker runs (serveDiagnostics), and after every message it posts bumps the shared counter the
 * asking thread sleeps on.
 */
import type { MessagePort } from "node:worker_threads";
import { WORKER_READY } from "./nodePool.ts";
import { serveDiagnostics } from "./protocol.ts";

/** Serves diagnostics requests arriving on `port`; `signal[0]` is bumped (and waiters woken) after every message posted. */
export function serveWorkerPort(port: MessagePort, signal: Int32Array): void {
  const post = (message: unknown, transfer: ArrayBuffer[]) => {
    port.postMessage(message, transfer);
    Atomics.add(signal, 0, 1);
    Atomics.notify(signal, 0);
  };
  port.on("message", (data: unknown) => listeners.forEach((l) => l({ data })));
  const listeners: ((event: { readonly data: unknown }) => void)[] = [];
  serveDiagnostics({ addEventListener: (_type, listener) => void listeners.push(listener), postMessage: post });
  post({ type: WORKER_READY }, []);
}
