import { EffectError } from "@skewsmith/core";
import { asc, eq, sql } from "drizzle-orm";
import type { z } from "zod";
import type { Tx } from "../db/client.server.ts";
import { effects, projects, targetProfiles, type TargetProfile } from "../db/schema.ts";
import { fieldErrors } from "../forms.ts";
import { newEffectDocument, targetProfileInput, type TargetProfileInput } from "../effects/settings.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation } from "./errors.ts";

const DOCUMENT_TO_FIELD: ReadonlyMap<string, string> = new Map([
  ["canvas.width", "canvasWidth"],
  ["canvas.height", "canvasHeight"],
  ["fixedPoint.bits", "fixedPointBits"],
  ["fixedPoint.fraction", "fixedPointFraction"],
  ["rounding", "rounding"],
  ["halfTurn", "halfTurn"],
  ["edges", "edges"],
  ["columnGroup", "columnGroup"],
]);

const FIELD_LABEL: ReadonlyMap<string, string> = new Map([
  ["canvasWidth", "Canvas width"],
  ["canvasHeight", "Canvas height"],
  ["fixedPointBits", "Bits"],
  ["fixedPointFraction", "Fraction bits"],
  ["columnGroup", "Column group"],
]);

/** Creates a target profile for a team; its settings must make a valid effect (checked by core). */
export async function createTargetProfile(
  db: Tx,
  input: { teamId: string; actorId: string | null } & z.input<typeof targetProfileInput>,
): Promise<TargetProfile> {
  const parsed = targetProfileInput.safeParse(input);
  if (!parsed.success) {
    const [field, message] = Object.entries(fieldErrors(parsed.error))[0];
    throw new DomainError(message, { field });
  }
  const settings: TargetProfileInput = parsed.data;
  try {
    newEffectDocument(settings);
  } catch (error) {
    if (error instanceof EffectError) {
      // Name the form field behind the first document field core refused.
      const issue = error.issues[0];
      const field = DOCUMENT_TO_FIELD.get(issue.path);
      throw new DomainError(`${(field && FIELD_LABEL.get(field)) ?? issue.path}: ${issue.message}`, { field });
    }
    throw error;
  }
  try {
    return await db.transaction(async (tx) => {
      const [profile] = await tx
        .insert(targetProfiles)
        .values({ teamId: input.teamId, ...settings })
        .returning();
      await recordActivity(tx, {
        teamId: input.teamId,
        userId: input.actorId,
        action: "target_profile.created",
        summary: `created the target profile ${settings.name}`,
      });
      return profile;
    });
  } catch (error) {
    if (isUniqueViolation(error, "target_profiles_team_name_key"))
      throw new DomainError(`The team already has a target profile called “${settings.name}”.`, { field: "name", status: 409 });
    throw error;
  }
}

export async function getTargetProfile(db: Tx, profileId: string): Promise<TargetProfile | null> {
  const [profile] = await db.select().from(targetProfiles).where(eq(targetProfiles.id, profileId));
  return profile ?? null;
}

export interface TargetProfileListItem extends TargetProfile {
  /** Live effects using the profile, in the project asked about (or the whole team). */
  effectCount: number;
}

/** A team's target profiles, by name, with how many live effects use each (in one project when given). */
export async function listTargetProfiles(db: Tx, teamId: string, projectId?: string): Promise<TargetProfileListItem[]> {
  const used = projectId
    ? sql<number>`(select count(*)::int from ${effects} e where e.target_profile_id = "target_profiles"."id" and e.deleted_at is null and e.project_id = ${projectId})`
    : sql<number>`(select count(*)::int from ${effects} e join ${projects} p on p.id = e.project_id where e.target_profile_id = "target_profiles"."id" and e.deleted_at is null and p.archived_at is null)`;
  const rows = await db
    .select({ profile: targetProfiles, effectCount: used })
    .from(targetProfiles)
    .where(eq(targetProfiles.teamId, teamId))
    .orderBy(asc(sql`lower(${targetProfiles.name})`));
  return rows.map((r) => ({ ...r.profile, effectCount: r.effectCount }));
}
