/** A member's role in a team, from most to least powerful. Kept free of database code so pages can use it. */
export const ROLES = ["owner", "editor", "viewer"] as const;
export type Role = (typeof ROLES)[number];

const RANK: Record<Role, number> = { viewer: 0, editor: 1, owner: 2 };

/** True when `role` is at least `needed` (owner > editor > viewer). */
export function hasRole(role: Role | null | undefined, needed: Role): boolean {
  return role != null && RANK[role] >= RANK[needed];
}

/** What each role may do, in the words the UI uses. */
export const ROLE_SUMMARY: Record<Role, string> = {
  owner: "Owners manage members and roles, and change everything.",
  editor: "Editors create and change projects and effects.",
  viewer: "Viewers read everything and change nothing.",
};
