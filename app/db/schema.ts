/**
 * Skewsmith's database schema (PostgreSQL through Drizzle). Column names are camelCase here and
 * snake_case in SQL (the client and drizzle-kit both run with `casing: "snake_case"`).
 * Order: enums, tables, relations, inferred types.
 */
import { relations, sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  check,
  customType,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import type { Effect as EffectDocument } from "@skewsmith/core";
import { ROLES, type Role } from "../roles.ts";
import { TOKEN_SCOPES, type TokenScope } from "../tokens.ts";

export { ROLES, type Role };
export const roleEnum = pgEnum("role", ROLES);

export { TOKEN_SCOPES, type TokenScope };
export const tokenScopeEnum = pgEnum("token_scope", TOKEN_SCOPES);

/** How a sprite's pixels are kept: palette indices, or 8-bit RGBA. */
export const SPRITE_KINDS = ["indexed", "rgba"] as const;
export type SpriteKind = (typeof SPRITE_KINDS)[number];
export const spriteKindEnum = pgEnum("sprite_kind", SPRITE_KINDS);

/** Bumped on every change of a versioned row; a change names the version it started from (a stale one is refused). */
const version = () => integer().notNull().default(1);

const bytea = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => "bytea",
});

const timestamps = {
  createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp({ withTimezone: true })
    .notNull()
    .defaultNow()
    .$onUpdate(() => new Date()),
};

// Columns several tables repeat. Each is a function, so every table gets a builder of its own; the
// `references` callbacks run only when Drizzle resolves foreign keys, after every table below exists.

/** A random UUID primary key. */
const uuidKey = () => uuid().primaryKey().defaultRandom();
/** The team a row belongs to; the row goes with the team. */
const teamRef = () =>
  uuid()
    .notNull()
    .references(() => teams.id, { onDelete: "cascade" });
/** The project a row belongs to; the row goes with the project. */
const projectRef = () =>
  uuid()
    .notNull()
    .references(() => projects.id, { onDelete: "cascade" });
/** The person a row belongs to; the row goes with the account. */
const userRef = () =>
  uuid()
    .notNull()
    .references(() => users.id, { onDelete: "cascade" });
/** Who did something; the row stays (with no one named) when that account goes. */
const actorRef = () => uuid().references(() => users.id, { onDelete: "set null" });

// ---------------------------------------------------------------------------------------------
// Tables

export const users = pgTable("users", {
  id: uuidKey(),
  /** The account id at the sign-in provider (GitHub's numeric user id). */
  githubId: bigint({ mode: "number" }).notNull().unique("users_github_id_key"),
  login: text().notNull(),
  name: text(),
  email: text(),
  avatarUrl: text(),
  ...timestamps,
});

/** Server-side sessions. The cookie holds a random id; this table keys the session by that id's SHA-256. */
export const sessions = pgTable(
  "sessions",
  {
    idHash: text().primaryKey(),
    userId: uuid().references(() => users.id, { onDelete: "cascade" }),
    data: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    ...timestamps,
  },
  (t) => [index().on(t.userId), index().on(t.expiresAt)],
);

export const teams = pgTable("teams", {
  id: uuidKey(),
  name: text().notNull(),
  /** A stable, URL-safe handle chosen at creation. */
  slug: text().notNull().unique("teams_slug_key"),
  version: version(),
  ...timestamps,
});

export const memberships = pgTable(
  "memberships",
  {
    teamId: teamRef(),
    userId: userRef(),
    role: roleEnum().notNull(),
    ...timestamps,
  },
  (t) => [primaryKey({ columns: [t.teamId, t.userId] }), index().on(t.userId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: uuidKey(),
    teamId: teamRef(),
    email: text().notNull(),
    role: roleEnum().notNull(),
    /** SHA-256 of the token mailed to the invitee; the token itself is never stored. */
    tokenHash: text().notNull().unique("invitations_token_hash_key"),
    expiresAt: timestamp({ withTimezone: true }).notNull(),
    invitedBy: actorRef(),
    /** When the e-mail was last sent (the first time, or a resend). */
    lastSentAt: timestamp({ withTimezone: true }),
    acceptedAt: timestamp({ withTimezone: true }),
    acceptedBy: actorRef(),
    /** Set when an owner revoked the invitation; its link then no longer works. */
    revokedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    index().on(t.teamId),
    // One open (not accepted, not revoked) invitation per address and team; inviting again refreshes that one.
    uniqueIndex("invitations_team_open_email_key")
      .on(t.teamId, sql`lower(${t.email})`)
      .where(sql`${t.acceptedAt} is null and ${t.revokedAt} is null`),
  ],
);

export const projects = pgTable(
  "projects",
  {
    id: uuidKey(),
    teamId: teamRef(),
    name: text().notNull(),
    description: text().notNull().default(""),
    /** Set when archived (a soft delete); cleared by restore. */
    archivedAt: timestamp({ withTimezone: true }),
    createdBy: actorRef(),
    version: version(),
    ...timestamps,
  },
  (t) => [
    index().on(t.teamId),
    uniqueIndex("projects_team_live_name_key")
      .on(t.teamId, sql`lower(${t.name})`)
      .where(sql`${t.archivedAt} is null`),
  ],
);

/** A team's reusable preset of target settings, shared by its projects. */
export const targetProfiles = pgTable(
  "target_profiles",
  {
    id: uuidKey(),
    teamId: teamRef(),
    name: text().notNull(),
    description: text().notNull().default(""),
    canvasWidth: integer().notNull(),
    canvasHeight: integer().notNull(),
    /** Total bits of a fixed-point coefficient: 8, 16 or 32. */
    fixedPointBits: integer().notNull(),
    /** Fraction bits of a fixed-point coefficient. */
    fixedPointFraction: integer().notNull(),
    rounding: text().notNull(),
    halfTurn: text().notNull(),
    edges: text().notNull(),
    columnGroup: integer().notNull().default(1),
    /** Export dialects, by name (say "ca65", "c99"). */
    dialects: text()
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    labelPrefix: text().notNull().default(""),
    /** Most colours a sprite may use on this target (the background included), 2 to 256; null: no limit. */
    maxColours: integer(),
    /** Further export options the profile's effects export with by default (core's ExportOptionsInput, validated). */
    exportOptions: jsonb().$type<Record<string, unknown>>().notNull().default({}),
    version: version(),
    ...timestamps,
  },
  (t) => [
    uniqueIndex("target_profiles_team_name_key").on(t.teamId, sql`lower(${t.name})`),
    check("target_profiles_bits_check", sql`${t.fixedPointBits} in (8, 16, 32)`),
    check("target_profiles_fraction_check", sql`${t.fixedPointFraction} >= 0 and ${t.fixedPointFraction} < ${t.fixedPointBits}`),
    check("target_profiles_max_colours_check", sql`${t.maxColours} is null or ${t.maxColours} between 2 and 256`),
  ],
);

export const sprites = pgTable(
  "sprites",
  {
    id: uuidKey(),
    projectId: projectRef(),
    name: text().notNull(),
    /** The PNG file, as uploaded. */
    png: bytea().notNull(),
    /** Indexed (palette) or RGBA. */
    kind: spriteKindEnum().notNull().default("indexed"),
    width: integer().notNull(),
    height: integer().notNull(),
    /** Size of the PNG file in bytes. */
    byteSize: integer().notNull().default(0),
    /** Palette entries as [red, green, blue, alpha], 0–255 each; empty for an RGBA sprite. */
    palette: jsonb().$type<[number, number, number, number][]>().notNull(),
    uploadedBy: actorRef(),
    version: version(),
    ...timestamps,
  },
  (t) => [index().on(t.projectId), uniqueIndex("sprites_project_name_key").on(t.projectId, sql`lower(${t.name})`)],
);

export const effects = pgTable(
  "effects",
  {
    id: uuidKey(),
    projectId: projectRef(),
    name: text().notNull(),
    /** What the effect is for, and anything it shows on purpose (say, a canvas kept tight to teach something). */
    description: text().notNull().default(""),
    /** The effect document (skewsmith.effect/1), stored only after core's parseEffect accepted it. */
    document: jsonb().$type<EffectDocument>().notNull(),
    /** Bumped on every change of the document; a save names the version it started from. */
    version: integer().notNull().default(1),
    targetProfileId: uuid().references(() => targetProfiles.id, { onDelete: "set null" }),
    /** True while the effect follows its target profile (profile changes flow in); false once detached. */
    followsProfile: boolean().notNull().default(true),
    spriteId: uuid().references(() => sprites.id, { onDelete: "set null" }),
    /** Where the sprite's top-left pixel sits in the canvas, in pixels; null means centred. */
    spriteX: integer(),
    spriteY: integer(),
    /** Pixels the artist marked as key (must read well), as [x, y] in sprite pixels (canvas pixels without a sprite). */
    keyPixels: jsonb().$type<[number, number][]>().notNull().default([]),
    /** Set when deleted (soft, restorable for a grace period). */
    deletedAt: timestamp({ withTimezone: true }),
    createdBy: actorRef(),
    updatedBy: actorRef(),
    ...timestamps,
  },
  (t) => [
    index().on(t.projectId),
    // Foreign keys that pages count by (effects per target profile) and that a profile's or sprite's deletion
    // must find (ON DELETE SET NULL): without these, each is a scan of every effect.
    index().on(t.targetProfileId),
    index().on(t.spriteId),
    uniqueIndex("effects_project_live_name_key")
      .on(t.projectId, sql`lower(${t.name})`)
      .where(sql`${t.deletedAt} is null`),
    check("effects_version_check", sql`${t.version} >= 1`),
  ],
);

/** One setting of a target profile that changed, as shown to people: "Canvas", "256 × 224" → "320 × 224". */
export interface ProfileFieldChange {
  field: string;
  label: string;
  from: string;
  to: string;
}

/**
 * The last change of a target profile that reached an effect (one row per effect, replaced by the next change):
 * what changed, when and by whom, and the effect version it produced.
 */
export const effectProfileChanges = pgTable("effect_profile_changes", {
  effectId: uuid()
    .primaryKey()
    .references(() => effects.id, { onDelete: "cascade" }),
  targetProfileId: uuid().references(() => targetProfiles.id, { onDelete: "set null" }),
  /** The profile's name at the time (the profile may be renamed or deleted later). */
  profileName: text().notNull(),
  /** The profile's version after the change. */
  profileVersion: integer().notNull(),
  /** The effect's version after the change (unchanged when only export settings changed). */
  effectVersion: integer().notNull(),
  changes: jsonb().$type<ProfileFieldChange[]>().notNull(),
  changedBy: actorRef(),
  changedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
  ...timestamps,
});

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuidKey(),
    userId: userRef(),
    name: text().notNull(),
    /** SHA-256 of the token; the token is shown once and never stored. */
    tokenHash: text().notNull().unique("api_tokens_token_hash_key"),
    scope: tokenScopeEnum().notNull().default("read"),
    lastUsedAt: timestamp({ withTimezone: true }),
    expiresAt: timestamp({ withTimezone: true }),
    revokedAt: timestamp({ withTimezone: true }),
    ...timestamps,
  },
  (t) => [index().on(t.userId)],
);

/** Who did what, when: one row per change, shown on team and project pages. */
export const activity = pgTable(
  "activity",
  {
    id: bigint({ mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    teamId: teamRef(),
    projectId: uuid().references(() => projects.id, { onDelete: "cascade" }),
    userId: actorRef(),
    /** What happened, as a dotted verb such as "project.renamed". */
    action: text().notNull(),
    /** A short human-readable description. */
    summary: text().notNull(),
    ...timestamps,
  },
  (t) => [index().on(t.teamId, t.createdAt), index().on(t.projectId, t.createdAt)],
);

// ---------------------------------------------------------------------------------------------
// Relations

export const usersRelations = relations(users, ({ many }) => ({
  memberships: many(memberships),
  sessions: many(sessions),
}));

export const sessionsRelations = relations(sessions, ({ one }) => ({
  user: one(users, { fields: [sessions.userId], references: [users.id] }),
}));

export const teamsRelations = relations(teams, ({ many }) => ({
  memberships: many(memberships),
  projects: many(projects),
  targetProfiles: many(targetProfiles),
  invitations: many(invitations),
}));

export const membershipsRelations = relations(memberships, ({ one }) => ({
  team: one(teams, { fields: [memberships.teamId], references: [teams.id] }),
  user: one(users, { fields: [memberships.userId], references: [users.id] }),
}));

export const invitationsRelations = relations(invitations, ({ one }) => ({
  team: one(teams, { fields: [invitations.teamId], references: [teams.id] }),
}));

export const projectsRelations = relations(projects, ({ one, many }) => ({
  team: one(teams, { fields: [projects.teamId], references: [teams.id] }),
  effects: many(effects),
  sprites: many(sprites),
}));

export const targetProfilesRelations = relations(targetProfiles, ({ one, many }) => ({
  team: one(teams, { fields: [targetProfiles.teamId], references: [teams.id] }),
  effects: many(effects),
}));

export const spritesRelations = relations(sprites, ({ one }) => ({
  project: one(projects, { fields: [sprites.projectId], references: [projects.id] }),
}));

export const effectsRelations = relations(effects, ({ one }) => ({
  project: one(projects, { fields: [effects.projectId], references: [projects.id] }),
  targetProfile: one(targetProfiles, { fields: [effects.targetProfileId], references: [targetProfiles.id] }),
  sprite: one(sprites, { fields: [effects.spriteId], references: [sprites.id] }),
}));

export const effectProfileChangesRelations = relations(effectProfileChanges, ({ one }) => ({
  effect: one(effects, { fields: [effectProfileChanges.effectId], references: [effects.id] }),
  targetProfile: one(targetProfiles, { fields: [effectProfileChanges.targetProfileId], references: [targetProfiles.id] }),
}));

export const apiTokensRelations = relations(apiTokens, ({ one }) => ({
  user: one(users, { fields: [apiTokens.userId], references: [users.id] }),
}));

export const activityRelations = relations(activity, ({ one }) => ({
  team: one(teams, { fields: [activity.teamId], references: [teams.id] }),
  project: one(projects, { fields: [activity.projectId], references: [projects.id] }),
  user: one(users, { fields: [activity.userId], references: [users.id] }),
}));

// ---------------------------------------------------------------------------------------------
// Types

export type User = typeof users.$inferSelect;
export type Session = typeof sessions.$inferSelect;
export type Team = typeof teams.$inferSelect;
export type Membership = typeof memberships.$inferSelect;
export type Invitation = typeof invitations.$inferSelect;
export type Project = typeof projects.$inferSelect;
export type TargetProfile = typeof targetProfiles.$inferSelect;
export type NewTargetProfile = typeof targetProfiles.$inferInsert;
export type Sprite = typeof sprites.$inferSelect;
export type EffectRow = typeof effects.$inferSelect;
export type EffectProfileChange = typeof effectProfileChanges.$inferSelect;
export type ApiToken = typeof apiTokens.$inferSelect;
export type Activity = typeof activity.$inferSelect;
