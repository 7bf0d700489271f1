/**
 * The invented people of the demo scenario (see docs/product.md), shared by the seed, the local
 * stand-in for GitHub and the browser tests. Names, logins and ids are made up.
 */
import type { Role } from "../db/schema.ts";

export interface DemoPerson {
  /** The account id the stand-in for GitHub reports. */
  readonly githubId: number;
  readonly login: string;
  readonly name: string;
  readonly email: string;
  /** Role in the demo team, or null for someone who belongs to no team yet. */
  readonly role: Role | null;
  /** What the person does at the studio, shown on the stand-in's sign-in page. */
  readonly job: string;
}

export const DEMO_TEAM = { name: "Tidewell Games", slug: "tidewell-games" } as const;

export const DEMO_PEOPLE: readonly DemoPerson[] = [
  {
    githubId: 7100001,
    login: "ysolde-brackwater",
    name: "Ysolde Brackwater",
    email: "ysolde@tidewell.example",
    role: "owner",
    job: "studio lead",
  },
  {
    githubId: 7100002,
    login: "oren-saltmarsh",
    name: "Oren Saltmarsh",
    email: "oren@tidewell.example",
    role: "editor",
    job: "programmer",
  },
  {
    githubId: 7100003,
    login: "juno-pelloway",
    name: "Juno Pelloway",
    email: "juno@tidewell.example",
    role: "viewer",
    job: "producer",
  },
  {
    githubId: 7100004,
    login: "ansel-fairlight",
    name: "Ansel Fairlight",
    email: "ansel@fairlight.example",
    role: null,
    job: "not in any team yet",
  },
];

/** The demo member with a given role. */
export function demoPerson(role: Role): DemoPerson {
  const person = DEMO_PEOPLE.find((p) => p.role === role);
  if (!person) throw new Error(`no demo person has the role ${role}`);
  return person;
}
