/** API token scopes, kept free of database code so pages can use them: `read`, or `write` which includes read. */
export const TOKEN_SCOPES = ["read", "write"] as const;
export type TokenScope = (typeof TOKEN_SCOPES)[number];

/** What each scope allows, in the words the settings page and the API reference use. */
export const SCOPE_SUMMARY: Record<TokenScope, string> = {
  read: "Read teams, projects and effects, compute tables and download exports.",
  write: "Everything read allows, and saving effect documents (where your role lets you edit).",
};

/** True when a token of `scope` may do what `needed` asks. */
export function scopeAllows(scope: TokenScope, needed: TokenScope): boolean {
  return scope === "write" || needed === "read";
}
