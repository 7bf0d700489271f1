import { Link } from "react-router";
import { Timestamp } from "./ui.tsx";

/** What the effect page needs of getProfileChange (app/models/effectChanges.server.ts); dates may arrive as strings. */
export interface ProfileChangeNoticeView {
  profileId: string | null;
  profileName: string;
  profileVersion: number;
  effectVersion: number;
  changes: { field: string; label: string; from: string; to: string }[];
  changedAt: Date | string;
  changedBy: string | null;
}

/**
 * The last change of its target profile that reached an effect: which profile, who, when, each setting before and
 * after, and the effect version it made. Shows nothing when no change has reached the effect.
 */
export function ProfileChangeNotice({ change, teamId }: { change: ProfileChangeNoticeView | null; teamId: string }) {
  if (!change) return null;
  const profile = change.profileId ? (
    <Link to={`/teams/${teamId}/profiles/${change.profileId}`} className="font-medium text-glass-200 underline-offset-2 hover:underline">
      {change.profileName}
    </Link>
  ) : (
    <span className="font-medium text-glass-200">{change.profileName}</span>
  );
  return (
    <section
      aria-label="Last change from the target profile"
      className="rounded-md border border-glass-700 bg-glass-900/40 px-4 py-3 text-sm text-ink-200"
      data-testid="profile-change-notice"
    >
      <p>
        Target profile {profile} (version <span className="num">{change.profileVersion}</span>) changed{" "}
        {change.changedBy ? <>by {change.changedBy} </> : null}on <Timestamp value={change.changedAt} />; this effect is at version{" "}
        <span className="num">{change.effectVersion}</span> since.
      </p>
      <ul className="mt-2 flex flex-col gap-0.5">
        {change.changes.map((c) => (
          <li key={c.field} className="flex flex-wrap gap-x-2">
            <span className="w-32 shrink-0 text-xs uppercase tracking-wide text-ink-400">{c.label}</span>
            <span className="num text-ink-400 line-through decoration-ink-600">{c.from}</span>
            <span aria-hidden="true" className="text-ink-500">
              →
            </span>
            <span className="sr-only">became</span>
            <span className="num text-ink-100">{c.to}</span>
          </li>
        ))}
      </ul>
    </section>
  );
}
