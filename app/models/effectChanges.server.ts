/**
 * Who saved an effect last and the last change of its target profile that reached it: what the effect page shows
 * above the bench. The page reads them within its one query of lists (./effectPage.server.ts) through the columns and
 * the reading here; getEffectChanges reads them alone.
 */
import { eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import { effectProfileChanges, effects, users, type ProfileFieldChange } from "../db/schema.ts";

/** The last change of its target profile that reached an effect, for the effect page. */
export interface ProfileChangeView {
  profileId: string | null;
  profileName: string;
  profileVersion: number;
  effectVersion: number;
  changes: ProfileFieldChange[];
  changedAt: Date;
  changedBy: string | null;
}

/** The record of the last profile change that reached the effect, or null when none has. */
export async function getProfileChange(db: Tx, effectId: string): Promise<ProfileChangeView | null> {
  return (await getEffectChanges(db, effectId)).profileChange;
}

/**
 * Who saved the effect last (name and login, or null) and the last profile change that reached it: the effect page
 * shows both, read in one query.
 */
export async function getEffectChanges(
  db: Tx,
  effectId: string,
): Promise<{ updatedBy: { name: string | null; login: string } | null; profileChange: ProfileChangeView | null }> {
  const query = preparedOnce(db, "skewsmith_effect_changes", (d) => {
    const updater = alias(users, "updater");
    return d
      .select(effectChangeColumns(updater))
      .from(effects)
      .leftJoin(updater, eq(updater.id, effects.updatedBy))
      .leftJoin(effectProfileChanges, eq(effectProfileChanges.effectId, effects.id))
      .leftJoin(users, eq(users.id, effectProfileChanges.changedBy))
      .where(eq(effects.id, sql.placeholder("effectId")))
      .prepare("skewsmith_effect_changes");
  });
  const [row] = await query.execute({ effectId });
  return row ? effectChangesOf(row) : { updatedBy: null, profileChange: null };
}

/**
 * The columns of who saved an effect last (`updater`, an alias of users joined on effects.updated_by) and of its
 * last profile change (effect_profile_changes and users joined on it): for a select from effects with those joins.
 */
export function effectChangeColumns(updater: ReturnType<typeof alias<typeof users, "updater">>) {
  return {
    updaterName: updater.name,
    updaterLogin: updater.login,
    profileId: effectProfileChanges.targetProfileId,
    profileName: effectProfileChanges.profileName,
    profileVersion: effectProfileChanges.profileVersion,
    effectVersion: effectProfileChanges.effectVersion,
    changes: effectProfileChanges.changes,
    changedAt: effectProfileChanges.changedAt,
    changedBy: sql<string | null>`coalesce(${users.name}, ${users.login})`,
  };
}

/** A row of effectChangeColumns: every column can be null, as the joins are left joins. */
type EffectChangeRow = { updaterName: string | null; updaterLogin: string | null } & {
  [K in keyof ProfileChangeView]: ProfileChangeView[K] | null;
};

/** Who saved last and the last profile change, from a row of effectChangeColumns. */
export function effectChangesOf(row: EffectChangeRow): {
  updatedBy: { name: string | null; login: string } | null;
  profileChange: ProfileChangeView | null;
} {
  const { updaterName, updaterLogin, profileName, profileVersion, effectVersion, changes, changedAt, ...change } = row;
  return {
    updatedBy: updaterLogin === null ? null : { name: updaterName, login: updaterLogin },
    // Every column of a change row but the profile's id and who made it is NOT NULL: a null name means no row.
    profileChange:
      profileName === null || profileVersion === null || effectVersion === null || changes === null || changedAt === null
        ? null
        : { ...change, profileName, profileVersion, effectVersion, changes, changedAt },
  };
}
