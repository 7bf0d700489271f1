import { createContext, useContext } from "react";

/**
 * The nonce of this page's Content-Security-Policy (entry.server.tsx makes one per response). The framework's inline
 * scripts carry it, so the policy can forbid every other inline script. Undefined in the browser, where the scripts
 * are already in the page.
 */
export const NonceContext = createContext<string | undefined>(undefined);

export function useNonce(): string | undefined {
  return useContext(NonceContext);
}

/**
 * The page's nonce in the browser, for code that must add a <style> or <script> element itself (CodeMirror's themes):
 * read from the framework's scripts, which carry it (browsers hide the attribute but keep the `nonce` property).
 */
export function pageNonce(): string | undefined {
  if (typeof document === "undefined") return undefined;
  return document.querySelector<HTMLScriptElement>("script[nonce]")?.nonce || undefined;
}
