import { eq } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { users, type User } from "../db/schema.ts";

/** What the sign-in provider tells us about a person. */
export interface GitHubProfile {
  githubId: number;
  login: string;
  name: string | null;
  email: string | null;
  avatarUrl: string | null;
}

/** Creates the person on first sign-in, or refreshes their login, name, e-mail and avatar on later ones. */
export async function upsertGitHubUser(db: Tx, profile: GitHubProfile): Promise<User> {
  const [user] = await db
    .insert(users)
    .values(profile)
    .onConflictDoUpdate({
      target: users.githubId,
      set: { login: profile.login, name: profile.name, email: profile.email, avatarUrl: profile.avatarUrl, updatedAt: new Date() },
    })
    .returning();
  return user;
}

export async function getUser(db: Tx, userId: string): Promise<User | null> {
  const [user] = await db.select().from(users).where(eq(users.id, userId));
  return user ?? null;
}

/** How a person is shown: their name, else their login. */
export function displayName(user: Pick<User, "name" | "login">): string {
  return user.name?.trim() || user.login;
}
