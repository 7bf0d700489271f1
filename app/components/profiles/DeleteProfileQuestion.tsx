/** What deleting a target profile does, said before it is done: how many effects it detaches, and that they keep their settings. */
export function DeleteProfileQuestion({ name, users }: { name: string; users: number }) {
  return (
    <>
      {users > 0 ? (
        <p>
          <strong className="text-ink-100">
            <span className="num">{users}</span> effect{users === 1 ? " uses" : "s use"} “{name}”
          </strong>{" "}
          (deleted ones and those in archived projects included). Deleting the profile detaches {users === 1 ? "it" : "them"}:{" "}
          {users === 1 ? "it keeps" : "each keeps"} its canvas and arithmetic as they are now, and exports with core's defaults instead of
          the profile's dialects and label prefix.
        </p>
      ) : (
        <p>No effect uses “{name}”.</p>
      )}
      <p>This cannot be undone; the team's activity keeps a note of it.</p>
    </>
  );
}
