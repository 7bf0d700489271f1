import type { Role } from "../../roles.ts";

/** What removing a member does, said before it is done. */
export function RemoveMemberQuestion({
  name,
  email,
  role,
  teamName,
}: {
  name: string;
  email: string | null;
  role: Role;
  teamName: string;
}) {
  return (
    <>
      <p>
        {name} ({role}) will no longer see {teamName}'s projects, effects, sprites or target profiles. What they made stays with the team.
      </p>
      <p>
        {email ? (
          <>
            They are told by e-mail at <span className="num text-ink-100">{email}</span>.
          </>
        ) : (
          "They share no e-mail address, so they will not be told by e-mail."
        )}{" "}
        To bring them back, invite them again.
      </p>
    </>
  );
}
