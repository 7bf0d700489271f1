/** A refused stale save: who saved, what they changed against the version you started from, and what to do. */
import type { Conflict } from "./useBenchDraft.ts";
import { FIELD_LABELS, type DraftField } from "../../bench/draft.ts";
import { buttonClass, Timestamp } from "../ui.tsx";

export function ConflictNotice({
  conflict,
  startedFrom,
  onKeepMine,
  onTakeTheirs,
}: {
  conflict: Conflict;
  startedFrom: number;
  onKeepMine: () => void;
  onTakeTheirs: () => void;
}) {
  return (
    <section
      aria-labelledby="conflict-title"
      className="rounded-lg border border-alert-400/60 bg-alert-900/50 px-4 py-3"
      data-testid="conflict"
      role="alert"
    >
      <h2 id="conflict-title" className="font-semibold text-alert-300">
        {conflict.updatedBy ?? "Someone"} saved this effect after you started editing
      </h2>
      <p className="mt-1 text-sm text-ink-200">
        Version {conflict.version} is saved
        {conflict.updatedAt ? (
          <>
            {" "}
            (<Timestamp value={conflict.updatedAt} />)
          </>
        ) : null}
        ; your edits started from version {startedFrom}. Nothing was overwritten and your edits are still here.
      </p>
      {conflict.changes.length > 0 ? (
        <>
          <p className="mt-2 text-sm text-ink-200">What they changed:</p>
          <table className="mt-1 w-full text-sm" data-testid="conflict-changes">
            <thead className="text-xs text-ink-400">
              <tr>
                <th scope="col" className="py-1 pr-3 text-left font-medium">
                  Setting
                </th>
                <th scope="col" className="py-1 pr-3 text-left font-medium">
                  Version {startedFrom}
                </th>
                <th scope="col" className="py-1 text-left font-medium">
                  Their version {conflict.version}
                </th>
              </tr>
            </thead>
            <tbody>
              {conflict.changes.map((c) => (
                <tr key={c.field} className="border-t border-alert-400/20">
                  <td className="py-1 pr-3 text-ink-100">{c.label}</td>
                  <td className="num py-1 pr-3 text-ink-300">{c.before}</td>
                  <td className="num py-1 text-ink-100">{c.after}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      ) : (
        <p className="mt-2 text-sm text-ink-300">Their save changed nothing you can see on the bench.</p>
      )}
      <div className="mt-3 flex flex-wrap gap-2">
        <button type="button" className={buttonClass("primary", "sm")} onClick={onKeepMine}>
          Keep my edits on top of theirs
        </button>
        <button type="button" className={buttonClass("secondary", "sm")} onClick={onTakeTheirs}>
          Drop my edits and load theirs
        </button>
      </div>
      <p className="mt-2 text-xs text-ink-400">
        Keeping yours takes their values for the settings only they changed; then check the bench and save again.
      </p>
    </section>
  );
}

export function ClashNotice({ clashes }: { clashes: DraftField[] }) {
  if (clashes.length === 0) return null;
  return (
    <p className="rounded-md border border-glass-700 bg-glass-900/60 px-4 py-2 text-sm text-glass-200" role="status" data-testid="clashes">
      You and they both changed {clashes.map((f) => FIELD_LABELS[f].toLowerCase()).join(", ")}: your values are kept. Check them, then save.
    </p>
  );
}
