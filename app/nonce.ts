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
