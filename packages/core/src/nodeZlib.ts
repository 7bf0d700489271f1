import type * as NodeZlib from "node:zlib";

/** Node's zlib when the core runs on Node (`process.getBuiltinModule`, Node 20.16 and later), or undefined elsewhere. */
export function nodeZlib(): typeof NodeZlib | undefined {
  const p = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process;
  return p?.getBuiltinModule?.("node:zlib") as typeof NodeZlib | undefined;
}
