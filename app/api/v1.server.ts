/**
 * The handlers of the JSON API under /api/v1. Each checks the caller's scope and role first, reads its body through
 * readJson and answers JSON (or a zip); the route modules under app/routes only bind them to addresses.
 */
import { checkEffect, tablesText, type Effect } from "@skewsmith/core";
import { z } from "zod";
import { db } from "../db.server.ts";
import {
  effectExportSource,
  exportQuery,
  exportResponse,
  planEffectExport,
  planProjectExport,
  projectExportSources,
} from "../exports.server.ts";
import { createTokenForm } from "../forms.ts";
import { effectAccess, NOT_FOUND_MESSAGE, projectAccess, teamAccess } from "../guards.server.ts";
import { readJson } from "../http.server.ts";
import { createApiToken, getApiToken, listApiTokens, revokeApiToken, type ApiTokenListItem } from "../models/apiTokens.server.ts";
import { listEffects, saveEffectDocument } from "../models/effects.server.ts";
import { listProjects } from "../models/projects.server.ts";
import { listTeamsForUser } from "../models/teams.server.ts";
import { requireScope } from "./auth.server.ts";
import type { ApiContext } from "./endpoint.server.ts";
import { ApiError, json } from "./responses.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Most pixel-frames (canvas pixels × frames) one request may have measured: the tables document carries every frame's
 * diagnostics, which visit every pixel. 2^25 covers a 320 × 240 screen over 256 frames; bigger effects run locally
 * with `skewsmith tables`, which has no such limit.
 */
export const API_PIXEL_FRAMES_MAX = 2 ** 25;

/** The first problem of a failed parse, as an API error naming its field. */
function badBody(error: z.ZodError, prefix = ""): never {
  const issue = error.issues[0];
  const field = [prefix, ...issue.path.map(String)].filter(Boolean).join(".") || null;
  throw new ApiError(400, issue.message, { field });
}

/** Validates an effect document with core: the filled-in effect, or a 400 naming the first bad field (and listing every one). */
function effectFrom(document: unknown, prefix: string): Effect {
  const result = checkEffect(document);
  if (result.ok) return result.effect;
  const path = (p: string) => [prefix, p].filter(Boolean).join(".") || "(document)";
  throw new ApiError(400, `The effect document is not valid: ${result.issues.map((i) => `${path(i.path)}: ${i.message}`).join("; ")}`, {
    field: [prefix, result.issues[0].path].filter(Boolean).join(".") || prefix || null,
  });
}

function frameCount(effect: Effect): number {
  return "list" in effect.angles ? effect.angles.list.length : effect.angles.sweep.frames;
}

function iso(date: Date | null): string | null {
  return date ? date.toISOString() : null;
}

// ---------------------------------------------------------------------------------------------
// Who am I

export async function getIndex({ caller }: ApiContext): Promise<Response> {
  return json({
    api: "skewsmith/v1",
    user: { id: caller.user.id, login: caller.user.login, name: caller.user.name },
    via: caller.via,
    scope: caller.scope,
    docs: "/docs/api",
  });
}

// ---------------------------------------------------------------------------------------------
// Teams, projects, effects

export async function getTeams({ caller }: ApiContext): Promise<Response> {
  const teams = await listTeamsForUser(db(), caller.user.id);
  return json({
    teams: teams.map((t) => ({
      id: t.id,
      name: t.name,
      slug: t.slug,
      role: t.role,
      memberCount: t.memberCount,
      projectCount: t.projectCount,
    })),
  });
}

const ARCHIVED: Readonly<Record<string, boolean>> = { "": false, false: false, "0": false, true: true, "1": true };

export async function getTeamProjects({ caller, params, url }: ApiContext): Promise<Response> {
  const { team, role } = await teamAccess(caller.user, params.teamId, "viewer");
  const archivedText = url.searchParams.get("archived") ?? "";
  if (!Object.hasOwn(ARCHIVED, archivedText))
    throw new ApiError(400, `archived: ${JSON.stringify(archivedText)} is not allowed; allowed true or false`, { field: "archived" });
  const projects = await listProjects(db(), team.id, { archived: ARCHIVED[archivedText] });
  return json({
    team: { id: team.id, name: team.name, role },
    projects: projects.map((p) => ({
      id: p.id,
      name: p.name,
      description: p.description,
      effectCount: p.effectCount,
      lastChangedAt: iso(p.lastChangedAt),
      archived: p.archivedAt !== null,
    })),
  });
}

export async function getProjectEffects({ caller, params }: ApiContext): Promise<Response> {
  const { project, role } = await projectAccess(caller.user, params.projectId, "viewer");
  const effects = await listEffects(db(), project.id);
  return json({
    project: { id: project.id, name: project.name, teamId: project.teamId, role, archived: project.archivedAt !== null },
    effects: effects.map((e) => ({
      id: e.id,
      name: e.name,
      version: e.version,
      targetProfile: e.targetProfileName,
      sprite: e.spriteName,
      updatedAt: iso(e.updatedAt),
      updatedBy: e.updatedByName,
    })),
  });
}

/** A live effect the caller may reach with `needed`; a deleted one is "not there" (404), as for the lists. */
async function liveEffect(context: ApiContext, needed: "viewer" | "editor") {
  const access = await effectAccess(context.caller.user, context.params.effectId, needed);
  if (access.effect.deletedAt) throw new ApiError(404, NOT_FOUND_MESSAGE);
  return access;
}

export async function getEffect(context: ApiContext): Promise<Response> {
  const { effect, project, role } = await liveEffect(context, "viewer");
  return json({
    id: effect.id,
    name: effect.name,
    version: effect.version,
    projectId: project.id,
    teamId: project.teamId,
    role,
    targetProfileId: effect.targetProfileId,
    followsProfile: effect.followsProfile,
    spriteId: effect.spriteId,
    updatedAt: iso(effect.updatedAt),
    // Stored documents were validated on the way in; validating again fills in any default a newer core adds.
    document: effectFrom(effect.document, "document"),
  });
}

const saveBody = z.strictObject(
  {
    version: z
      .number({ error: "version: the version you started from is required, a whole number (GET the effect to learn it)." })
      .int("version: must be a whole number.")
      .min(1, "version: must be 1 or more.")
      .max(2 ** 31 - 1, "version: too large."),
    document: z.unknown().refine((d) => d !== undefined, "document: the effect document is required."),
  },
  {
    error: (issue) =>
      issue.code === "unrecognized_keys"
        ? `unknown field ${issue.keys.map((k) => `“${k}”`).join(", ")}; the body has version and document`
        : "The body must be a JSON object with version and document.",
  },
);

export async function putEffect(context: ApiContext): Promise<Response> {
  requireScope(context.caller, "write");
  const { effect } = await liveEffect(context, "editor");
  const parsed = saveBody.safeParse(await readJson(context.request));
  if (!parsed.success) badBody(parsed.error);
  const document = effectFrom(parsed.data.document, "document");
  const saved = await saveEffectDocument(db(), {
    effectId: effect.id,
    document,
    expectedVersion: parsed.data.version,
    actorId: context.caller.user.id,
  });
  return json({ id: saved.id, version: saved.version, updatedAt: iso(saved.updatedAt) });
}

// ---------------------------------------------------------------------------------------------
// Tables and exports

export async function postTables({ caller, request, url }: ApiContext): Promise<Response> {
  requireScope(caller, "read");
  const effect = effectFrom(await readJson(request), "");
  const pixelFrames = effect.canvas.width * effect.canvas.height * frameCount(effect);
  if (pixelFrames > API_PIXEL_FRAMES_MAX)
    throw new ApiError(
      400,
      `This effect is ${effect.canvas.width} × ${effect.canvas.height} pixels over ${frameCount(effect)} frames, ${pixelFrames} pixel-frames to measure; the API measures at most ${API_PIXEL_FRAMES_MAX} per call. Run \`skewsmith tables\` locally for bigger effects.`,
    );
  const pretty = url.searchParams.has("pretty") && url.searchParams.get("pretty") !== "false";
  return new Response(tablesText(effect, { pretty }), {
    headers: { "Content-Type": "application/json; charset=utf-8", "Cache-Control": "private, no-store" },
  });
}

export async function getEffectExport(context: ApiContext): Promise<Response> {
  requireScope(context.caller, "read");
  const { effect } = await liveEffect(context, "viewer");
  const plan = planEffectExport(await effectExportSource(db(), effect), exportQuery(context.url.searchParams));
  return exportResponse(context.request, plan);
}

export async function getProjectExport({ caller, params, request, url }: ApiContext): Promise<Response> {
  requireScope(caller, "read");
  const { project } = await projectAccess(caller.user, params.projectId, "viewer");
  const query = exportQuery(url.searchParams);
  return exportResponse(request, planProjectExport(project, await projectExportSources(db(), project), query));
}

// ---------------------------------------------------------------------------------------------
// Tokens

function tokenJson(t: ApiTokenListItem) {
  const now = Date.now();
  const state = t.revokedAt ? "revoked" : t.expiresAt && t.expiresAt.getTime() <= now ? "expired" : "live";
  return {
    id: t.id,
    name: t.name,
    scope: t.scope,
    state,
    createdAt: iso(t.createdAt),
    lastUsedAt: iso(t.lastUsedAt),
    expiresAt: iso(t.expiresAt),
    revokedAt: iso(t.revokedAt),
  };
}

/** Making and revoking tokens takes the person themself, signed in: a token cannot mint or revoke tokens. */
function requireSession({ caller }: ApiContext, what: string): void {
  if (caller.via !== "session")
    throw new ApiError(
      403,
      `Tokens are ${what} by a signed-in person (the settings page, or this address with the session cookie), not with a token.`,
    );
}

export async function getTokens({ caller }: ApiContext): Promise<Response> {
  return json({ tokens: (await listApiTokens(db(), caller.user.id)).map(tokenJson) });
}

const tokenBody = z.strictObject(createTokenForm.shape, {
  error: (issue) =>
    issue.code === "unrecognized_keys"
      ? `unknown field ${issue.keys.map((k) => `“${k}”`).join(", ")}; the body has name, scope and (optionally) expiresInDays`
      : "The body must be a JSON object with name and scope.",
});

export async function postToken(context: ApiContext): Promise<Response> {
  requireSession(context, "made");
  const parsed = tokenBody.safeParse(await readJson(context.request));
  if (!parsed.success) badBody(parsed.error);
  const { name, scope, expiresInDays } = parsed.data;
  const expiresAt = expiresInDays === null ? null : new Date(Date.now() + expiresInDays * 24 * 60 * 60 * 1000);
  const { token, item } = await createApiToken(db(), { userId: context.caller.user.id, name, scope, expiresAt });
  return json({ ...tokenJson(item), token }, 201, { Location: `/api/v1/tokens/${item.id}` });
}

/** One of the caller's own tokens; anyone else's, like one that does not exist, is a 404. */
async function ownToken({ caller, params }: ApiContext): Promise<ApiTokenListItem> {
  const id = params.tokenId;
  const token = id && UUID.test(id) ? await getApiToken(db(), { userId: caller.user.id, tokenId: id }) : null;
  if (!token) throw new ApiError(404, "You have no such token.");
  return token;
}

export async function getToken(context: ApiContext): Promise<Response> {
  return json(tokenJson(await ownToken(context)));
}

export async function deleteToken(context: ApiContext): Promise<Response> {
  requireSession(context, "revoked");
  const token = await ownToken(context);
  return json(tokenJson(await revokeApiToken(db(), { userId: context.caller.user.id, tokenId: token.id })));
}
