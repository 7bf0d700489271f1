/**
 * A small team of the test's own, with one of everything the app has so far, and its people signed in over HTTP:
 * owner, editor, viewer, and a stranger who owns a team of their own (for "not yours" cases).
 */
import { eq, inArray, sql } from "drizzle-orm";
import type { Db } from "../../app/db/client.server.ts";
import {
  effects,
  projects,
  teams,
  type EffectRow,
  type Project,
  type Sprite,
  type TargetProfile,
  type Team,
  type User,
} from "../../app/db/schema.ts";
import { createApiToken } from "../../app/models/apiTokens.server.ts";
import { deleteEffect } from "../../app/models/effects.server.ts";
import { createInvitation } from "../../app/models/invitations.server.ts";
import { archiveProject } from "../../app/models/projects.server.ts";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../factories.ts";
import { signedIn, type Client } from "./http.ts";

export interface World {
  owner: User;
  editor: User;
  viewer: User;
  stranger: User;
  team: Team;
  project: Project;
  archived: Project;
  profile: TargetProfile;
  sprite: Sprite;
  effect: EffectRow;
  deleted: EffectRow;
  /** An open invitation of the team (to an address nobody has), and the owner's live API token (write scope). */
  invitation: { id: string; token: string };
  token: { id: string; secret: string };
  /**
   * What the delete questions show, as a reloaded page would: the ids of the effects using the sprite (deleted ones
   * too) and how many effects use the profile. `refreshUses` reads them again after a change.
   */
  uses: { sprite: string[]; profile: number };
  /** Things in the stranger's own team, to name from outside it. */
  foreign: { team: Team; project: Project; effect: EffectRow; sprite: Sprite };
  as: { owner: Client; editor: Client; viewer: Client; stranger: Client };
}

export async function makeWorld(db: Db, base: string, githubUrl: string): Promise<World> {
  const [owner, editor, viewer, stranger] = [await makeUser(db), await makeUser(db), await makeUser(db), await makeUser(db)];
  const team = await makeTeam(db, {
    owner,
    members: [
      { user: editor, role: "editor" },
      { user: viewer, role: "viewer" },
    ],
  });
  const project = await makeProject(db, { team, actor: owner, description: "A level." });
  const archived = await makeProject(db, { team, actor: owner });
  await archiveProject(db, { projectId: archived.id, actorId: owner.id });
  const profile = await makeTargetProfile(db, { team, actor: owner });
  const sprite = await makeSprite(db, { project, actor: owner });
  const effect = await makeEffect(db, { project, actor: owner, sprite, targetProfile: profile });
  const deleted = await makeEffect(db, { project, actor: owner });
  await deleteEffect(db, { effectId: deleted.id, actorId: owner.id });
  const issued = await createInvitation(db, {
    teamId: team.id,
    email: `invitee-${team.id.slice(0, 8)}@example.com`,
    role: "viewer",
    actorId: owner.id,
  });
  const invitation = { id: issued.invitation.id, token: issued.token };
  const made = await createApiToken(db, { userId: owner.id, name: `World ${team.id.slice(0, 8)}`, scope: "write", expiresAt: null });
  const token = { id: made.item.id, secret: made.token };
  const foreignTeam = await makeTeam(db, { owner: stranger });
  const foreignProject = await makeProject(db, { team: foreignTeam, actor: stranger });
  const foreignSprite = await makeSprite(db, { project: foreignProject, actor: stranger });
  const foreign = {
    team: foreignTeam,
    project: foreignProject,
    effect: await makeEffect(db, { project: foreignProject, actor: stranger, sprite: foreignSprite }),
    sprite: foreignSprite,
  };
  const as = {
    owner: await signedIn(base, githubUrl, owner),
    editor: await signedIn(base, githubUrl, editor),
    viewer: await signedIn(base, githubUrl, viewer),
    stranger: await signedIn(base, githubUrl, stranger),
  };
  const world = {
    owner,
    editor,
    viewer,
    stranger,
    team,
    project,
    archived,
    profile,
    sprite,
    effect,
    deleted,
    invitation,
    token,
    foreign,
    as,
  };
  return { ...world, uses: await usesOf(db, world) };
}

async function usesOf(db: Db, world: Pick<World, "sprite" | "profile">): Promise<World["uses"]> {
  const sprite = await db.select({ id: effects.id }).from(effects).where(eq(effects.spriteId, world.sprite.id));
  const profile = await db.select({ id: effects.id }).from(effects).where(eq(effects.targetProfileId, world.profile.id));
  return { sprite: sprite.map((e) => e.id), profile: profile.length };
}

/** Reads `world.uses` again (after changes that made or removed effects). */
export async function refreshUses(db: Db, world: World): Promise<void> {
  world.uses = await usesOf(db, world);
}

/**
 * A fingerprint of every row the world's people and teams own, in every table an action can write: equal
 * fingerprints mean nothing was inserted, changed (updated_at included) or deleted. Sprite bytes are hashed.
 */
export async function snapshot(
  db: Db,
  world: Pick<World, "owner" | "editor" | "viewer" | "stranger" | "team" | "foreign">,
): Promise<string> {
  const userIds = [world.owner.id, world.editor.id, world.viewer.id, world.stranger.id];
  const teamRows = await db
    .select({ id: teams.id })
    .from(teams)
    .where(inArray(teams.id, [world.team.id, world.foreign.team.id]));
  const teamIds = teamRows.map((t) => t.id);
  const projectIds = (await db.select({ id: projects.id }).from(projects).where(inArray(projects.teamId, teamIds))).map((p) => p.id);
  const users = sql.join(
    userIds.map((id) => sql`${id}::uuid`),
    sql`, `,
  );
  const teamList = sql.join(
    teamIds.map((id) => sql`${id}::uuid`),
    sql`, `,
  );
  const projectList = projectIds.length
    ? sql.join(
        projectIds.map((id) => sql`${id}::uuid`),
        sql`, `,
      )
    : sql`null::uuid`;
  const { rows } = await db.execute<{ part: string; digest: string | null }>(sql`
    select 'teams' as part, md5(string_agg(t::text, '|' order by t.id)) as digest from teams t where t.id in (${teamList})
    union all select 'memberships', md5(string_agg(m::text, '|' order by m.team_id, m.user_id)) from memberships m
      where m.team_id in (${teamList}) or m.user_id in (${users})
    union all select 'projects', md5(string_agg(p::text, '|' order by p.id)) from projects p where p.team_id in (${teamList})
    union all select 'effects', md5(string_agg(e::text, '|' order by e.id)) from effects e where e.project_id in (${projectList})
    union all select 'target_profiles', md5(string_agg(tp::text, '|' order by tp.id)) from target_profiles tp where tp.team_id in (${teamList})
    union all select 'sprites', md5(string_agg(concat_ws(',', s.id, s.name, md5(s.png), s.version, s.updated_at), '|' order by s.id)) from sprites s
      where s.project_id in (${projectList})
    union all select 'effect_profile_changes', md5(string_agg(c::text, '|' order by c.effect_id)) from effect_profile_changes c
      where c.effect_id in (select e.id from effects e where e.project_id in (${projectList}))
    union all select 'invitations', md5(string_agg(i::text, '|' order by i.id)) from invitations i where i.team_id in (${teamList})
    -- A bearer call stamps last_used_at (and so updated_at): a use, not a change of the token.
    union all select 'api_tokens', md5(string_agg(concat_ws(',', k.id, k.user_id, k.name, k.token_hash, k.scope, k.expires_at, k.revoked_at, k.created_at), '|' order by k.id))
      from api_tokens k where k.user_id in (${users})
    union all select 'activity', md5(string_agg(a::text, '|' order by a.id)) from activity a where a.team_id in (${teamList})
    union all select 'sessions', md5(string_agg(concat_ws(',', x.id_hash, x.user_id, x.expires_at, x.updated_at), '|' order by x.id_hash)) from sessions x
      where x.user_id in (${users})
    union all select 'users', md5(string_agg(u::text, '|' order by u.id)) from users u where u.id in (${users})
    union all select 'teams of the people', md5(string_agg(t::text, '|' order by t.id)) from teams t
      join memberships m on m.team_id = t.id where m.user_id in (${users})
  `);
  // One line per part, so a failed comparison names the part that changed.
  return rows.map((r) => `${r.part}: ${r.digest}`).join("\n");
}
