/**
 * Test factories: make users, teams, projects, target profiles, sprites and effects through the app's
 * own data functions (so they obey the same rules). The demo seed is built from these too.
 */
import { randomInt } from "node:crypto";
import type { Tx } from "../app/db/client.server.ts";
import type { Project, Role, Sprite, TargetProfile, Team, User } from "../app/db/schema.ts";
import { compassRose } from "../app/demo/art.ts";
import { createEffect } from "../app/models/effects.server.ts";
import { createProject } from "../app/models/projects.server.ts";
import { createSprite } from "../app/models/sprites.server.ts";
import { createTargetProfile } from "../app/models/targetProfiles.server.ts";
import { addMember, createTeam } from "../app/models/teams.server.ts";
import { upsertGitHubUser, type GitHubProfile } from "../app/models/users.server.ts";
import { encodePng, type Image } from "@skewsmith/core";

let counter = 0;
/** A short token that differs between calls and between test runs. */
export function unique(): string {
  counter += 1;
  return `${Date.now().toString(36)}${counter.toString(36)}${randomInt(36 ** 3).toString(36)}`;
}

export async function makeUser(db: Tx, overrides: Partial<GitHubProfile> = {}): Promise<User> {
  const tag = unique();
  const login = overrides.login ?? `tester-${tag}`;
  return upsertGitHubUser(db, {
    // Far above the demo accounts' ids.
    githubId: overrides.githubId ?? 1_000_000_000 + randomInt(1_000_000_000),
    login,
    name: overrides.name === undefined ? `Tester ${tag}` : overrides.name,
    email: overrides.email === undefined ? `${login}@example.test` : overrides.email,
    avatarUrl: overrides.avatarUrl ?? null,
  });
}

/** A team owned by `owner`, with other members added in the given roles. */
export async function makeTeam(
  db: Tx,
  input: { owner: User; name?: string; slug?: string; members?: { user: User; role: Role }[] },
): Promise<Team> {
  const team = await createTeam(db, { name: input.name ?? `Team ${unique()}`, ownerId: input.owner.id, slug: input.slug });
  for (const m of input.members ?? []) await addMember(db, { teamId: team.id, userId: m.user.id, role: m.role, actorId: input.owner.id });
  return team;
}

export async function makeTargetProfile(
  db: Tx,
  input: { team: Team; actor?: User } & Partial<Parameters<typeof createTargetProfile>[1]>,
): Promise<TargetProfile> {
  const { team, actor, ...settings } = input;
  return createTargetProfile(db, {
    name: `Profile ${unique()}`,
    canvasWidth: 64,
    canvasHeight: 64,
    fixedPointBits: 16,
    fixedPointFraction: 8,
    rounding: "nearest-away",
    halfTurn: "flip",
    edges: "wrap",
    columnGroup: 1,
    ...settings,
    teamId: team.id,
    actorId: actor?.id ?? null,
  });
}

export async function makeProject(db: Tx, input: { team: Team; actor: User; name?: string; description?: string }): Promise<Project> {
  return createProject(db, {
    teamId: input.team.id,
    name: input.name ?? `Project ${unique()}`,
    description: input.description ?? "",
    actorId: input.actor.id,
  });
}

/** A sprite from a picture (indexed or RGBA; a 16-pixel compass rose by default) or from a PNG file's bytes. */
export async function makeSprite(
  db: Tx,
  input: { project: Project; actor: User; name?: string; image?: Image; png?: Uint8Array },
): Promise<Sprite> {
  return createSprite(db, {
    projectId: input.project.id,
    name: input.name ?? `sprite-${unique()}.png`,
    png: input.png ?? encodePng(input.image ?? compassRose(16)),
    actorId: input.actor.id,
  });
}

export async function makeEffect(
  db: Tx,
  input: {
    project: Project;
    actor: User;
    name?: string;
    description?: string;
    document?: unknown;
    targetProfile?: TargetProfile;
    sprite?: Sprite;
    spriteX?: number | null;
    spriteY?: number | null;
  },
) {
  return createEffect(db, {
    projectId: input.project.id,
    name: input.name ?? `Effect ${unique()}`,
    description: input.description,
    spriteX: input.spriteX,
    spriteY: input.spriteY,
    actorId: input.actor.id,
    document: input.document,
    targetProfileId: input.targetProfile?.id,
    spriteId: input.sprite?.id,
  });
}

/** The fields of a valid target profile form (a 256 × 224 screen, Q8.8), as the page posts them; spread and override. */
export const PROFILE_FORM = {
  canvasWidth: "256",
  canvasHeight: "224",
  fixedPointBits: "16",
  fixedPointFraction: "8",
  rounding: "nearest-away",
  halfTurn: "flip",
  edges: "wrap",
  columnGroup: "1",
} as const;
