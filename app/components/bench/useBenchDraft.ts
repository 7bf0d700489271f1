/**
 * The bench's editing state: the draft, the saved version it started from, the check of every field (the same schema
 * the action runs), the save with its version, a stale save's conflict, and the draft kept in localStorage so it
 * survives a reload.
 */
import { useCallback, useEffect, useReducer, useState } from "react";
import { useFetcher, useRevalidator } from "react-router";
import { draftToFields, sameDraft, stateToDraft, type BenchDraft, type BenchState, type DraftField } from "../../bench/draft.ts";
import { diffDrafts, mergeDrafts, type FieldChange } from "../../bench/diff.ts";
import { benchErrors, benchForm, type BenchErrors } from "../../bench/form.ts";
import type { SaveResult } from "../../routes/effect.tsx";

/** What the bench keeps in localStorage for one effect. */
interface Stored {
  format: 1;
  baseVersion: number;
  base: BenchDraft;
  draft: BenchDraft;
  at: string;
}

const storageKey = (effectId: string) => `skewsmith.bench.${effectId}`;

function readStored(effectId: string): Stored | null {
  try {
    const text = window.localStorage.getItem(storageKey(effectId));
    if (!text) return null;
    const stored = JSON.parse(text) as Stored;
    return stored.format === 1 && stored.draft && stored.base ? stored : null;
  } catch {
    return null;
  }
}

export interface Conflict {
  version: number;
  theirs: BenchDraft;
  updatedBy: string | null;
  updatedAt: string;
  /** What they changed against the version these edits started from. */
  changes: FieldChange[];
}

type Names = { profiles: Map<string, string>; sprites: Map<string, string> };

interface State {
  base: { version: number; draft: BenchDraft };
  draft: BenchDraft;
  /** The draft checked with the form's schema: the state to save, or the field messages. */
  state: BenchState | null;
  errors: BenchErrors | undefined;
  /** The last draft that checked out, for the preview while a field is bad. */
  lastValid: BenchState;
  conflict: Conflict | null;
  restoredAt: string | null;
  clashes: DraftField[];
  /** The draft the last save sent, to tell the server's field messages for it from later edits. */
  submitted: BenchDraft | null;
}

type Action =
  | { type: "edit"; patch: Partial<BenchDraft> }
  | {
      type: "replace";
      draft: BenchDraft;
      base?: State["base"];
      conflict?: Conflict | null;
      restoredAt?: string | null;
      clashes?: DraftField[];
    }
  | { type: "submitted"; draft: BenchDraft }
  | { type: "saved"; version: number; draft: BenchDraft }
  | { type: "conflict"; conflict: Conflict };

function check(draft: BenchDraft, lastValid: BenchState): Pick<State, "state" | "errors" | "lastValid"> {
  const result = benchForm.safeParse(draftToFields(draft));
  return result.success
    ? { state: result.data, errors: undefined, lastValid: result.data }
    : { state: null, errors: benchErrors(result.error), lastValid };
}

function reduce(s: State, a: Action): State {
  switch (a.type) {
    case "edit": {
      const draft = { ...s.draft, ...a.patch };
      return { ...s, draft, ...check(draft, s.lastValid) };
    }
    case "replace":
      return {
        ...s,
        draft: a.draft,
        ...check(a.draft, s.lastValid),
        base: a.base ?? s.base,
        conflict: a.conflict === undefined ? s.conflict : a.conflict,
        restoredAt: a.restoredAt === undefined ? s.restoredAt : a.restoredAt,
        clashes: a.clashes ?? s.clashes,
      };
    case "submitted":
      return { ...s, submitted: a.draft, clashes: [] };
    case "saved": {
      // Our save went through: it is the new base; edits made while it was on its way stay on top of it.
      const keep = s.submitted !== null && !sameDraft(s.submitted, s.draft);
      const draft = keep ? s.draft : a.draft;
      return { ...s, base: { version: a.version, draft: a.draft }, draft, ...check(draft, s.lastValid), restoredAt: null };
    }
    case "conflict":
      return { ...s, conflict: a.conflict };
  }
}

export function useBenchDraft(input: { effectId: string; version: number; saved: BenchState; editable: boolean; names: Names }) {
  const { effectId, version, saved, editable, names } = input;
  const [s, dispatch] = useReducer(reduce, null, (): State => {
    const draft = stateToDraft(saved);
    return {
      base: { version, draft },
      draft,
      state: saved,
      errors: undefined,
      lastValid: saved,
      conflict: null,
      restoredAt: null,
      clashes: [],
      submitted: null,
    };
  });
  const fetcher = useFetcher<SaveResult>({ key: `bench-save-${effectId}` });
  const revalidator = useRevalidator();
  const dirty = !sameDraft(s.draft, s.base.draft);

  // A newer saved version came with the page's data: our own save, or (without edits) anyone's. Adjusted while
  // rendering, as React recommends for state that follows a prop.
  const [seen, setSeen] = useState({ version, saved });
  if (seen.version !== version || seen.saved !== saved) {
    setSeen({ version, saved });
    if (version !== s.base.version) {
      const savedDraft = stateToDraft(saved);
      const ours = fetcher.data?.ok === true && fetcher.data.version === version;
      if (ours) dispatch({ type: "saved", version, draft: savedDraft });
      else if (!dirty && !s.conflict) dispatch({ type: "replace", draft: savedDraft, base: { version, draft: savedDraft } });
    }
  }

  // A refused save: what they changed against the version these edits started from.
  const [seenResult, setSeenResult] = useState(fetcher.data);
  if (fetcher.state === "idle" && fetcher.data !== seenResult) {
    setSeenResult(fetcher.data);
    const d = fetcher.data;
    if (d && !d.ok && d.conflict)
      dispatch({
        type: "conflict",
        conflict: {
          version: d.conflict.version,
          theirs: d.conflict.draft,
          updatedBy: d.conflict.updatedBy,
          updatedAt: d.conflict.updatedAt,
          changes: diffDrafts(s.base.draft, d.conflict.draft, names),
        },
      });
  }

  // Edits kept from before a reload come back once the page runs in the browser (localStorage is not there before).
  useEffect(() => {
    if (!editable) return;
    const stored = readStored(effectId);
    if (!stored || sameDraft(stored.draft, stored.base)) return;
    const savedDraft = stateToDraft(saved);
    if (stored.baseVersion === version)
      dispatch({ type: "replace", draft: stored.draft, base: { version, draft: stored.base }, restoredAt: stored.at });
    else
      dispatch({
        type: "replace",
        draft: stored.draft,
        base: { version: stored.baseVersion, draft: stored.base },
        restoredAt: stored.at,
        conflict: { version, theirs: savedDraft, updatedBy: null, updatedAt: "", changes: diffDrafts(stored.base, savedDraft, names) },
      });
    // Only when the bench opens.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  // Keep the draft while it differs from what it started from; forget it once saved or undone.
  useEffect(() => {
    if (!editable) return;
    const key = storageKey(effectId);
    try {
      if (!dirty && !s.conflict) window.localStorage.removeItem(key);
      else {
        const stored: Stored = { format: 1, baseVersion: s.base.version, base: s.base.draft, draft: s.draft, at: new Date().toISOString() };
        window.localStorage.setItem(key, JSON.stringify(stored));
      }
    } catch {
      // Storage full or switched off: the edits still live in the page.
    }
  }, [s.draft, s.base, dirty, s.conflict, effectId, editable]);

  const change = useCallback(
    <F extends DraftField>(field: F, value: BenchDraft[F]) => dispatch({ type: "edit", patch: { [field]: value } }),
    [],
  );
  const changeMany = useCallback((patch: Partial<BenchDraft>) => dispatch({ type: "edit", patch }), []);

  const save = useCallback(() => {
    if (!editable || s.conflict || !s.state) return;
    dispatch({ type: "submitted", draft: s.draft });
    fetcher.submit({ ...draftToFields(s.draft), intent: "save", version: String(s.base.version) }, { method: "post" });
  }, [s.draft, s.base.version, s.conflict, s.state, editable, fetcher]);

  /** Keeps your edits on top of their save: settings only they changed take their values. */
  const keepMine = useCallback(() => {
    if (!s.conflict) return;
    const merged = mergeDrafts(s.base.draft, s.draft, s.conflict.theirs);
    dispatch({
      type: "replace",
      draft: merged.draft,
      base: { version: s.conflict.version, draft: s.conflict.theirs },
      conflict: null,
      restoredAt: null,
      clashes: merged.clashes,
    });
    void revalidator.revalidate();
  }, [s.conflict, s.base.draft, s.draft, revalidator]);

  /** Drops your edits and shows their save. */
  const takeTheirs = useCallback(() => {
    if (!s.conflict) return;
    const theirs = s.conflict.theirs;
    dispatch({
      type: "replace",
      draft: theirs,
      base: { version: s.conflict.version, draft: theirs },
      conflict: null,
      restoredAt: null,
      clashes: [],
    });
    void revalidator.revalidate();
  }, [s.conflict, revalidator]);

  const discard = useCallback(() => dispatch({ type: "replace", draft: s.base.draft, restoredAt: null, clashes: [] }), [s.base.draft]);

  const idle = fetcher.state === "idle";
  const serverErrors =
    idle && fetcher.data && !fetcher.data.ok && !fetcher.data.conflict && s.submitted === s.draft ? fetcher.data.errors : undefined;
  return {
    draft: s.draft,
    base: s.base,
    dirty,
    errors: s.errors ?? serverErrors,
    state: s.state,
    lastValid: s.lastValid,
    change,
    changeMany,
    save,
    saving: !idle,
    result: idle ? fetcher.data : undefined,
    conflict: s.conflict,
    keepMine,
    takeTheirs,
    discard,
    restoredAt: s.restoredAt,
    clashes: s.clashes,
  };
}

export type BenchDraftApi = ReturnType<typeof useBenchDraft>;
