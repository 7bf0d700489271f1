/** The kinds of change an activity list can be narrowed to, by the prefix of their action. No server code: pages use these too. */
export const ACTIVITY_KINDS = ["effects", "sprites", "profiles", "members", "invitations", "tokens", "projects"] as const;
export type ActivityKind = (typeof ACTIVITY_KINDS)[number];

/** A Map, so a kind taken from a query string ("__proto__", "constructor", …) never reaches an object's prototype. */
export const KIND_PREFIXES: ReadonlyMap<string, readonly string[]> = new Map<string, readonly string[]>([
  ["effects", ["effect."]],
  ["sprites", ["sprite."]],
  ["profiles", ["target_profile."]],
  ["members", ["member.", "team."]],
  ["invitations", ["invitation."]],
  ["tokens", ["token."]],
  ["projects", ["project."]],
]);

/** True when `value` names one of ACTIVITY_KINDS. */
export function isActivityKind(value: string): value is ActivityKind {
  return KIND_PREFIXES.has(value);
}

/** How each kind is named on the page. */
export const KIND_LABELS: Readonly<Record<ActivityKind, string>> = {
  effects: "Effects",
  sprites: "Sprites",
  profiles: "Target profiles",
  members: "Members",
  invitations: "Invitations",
  tokens: "Tokens",
  projects: "Project",
};
