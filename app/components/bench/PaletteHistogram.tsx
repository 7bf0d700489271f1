/** The frame's colours beside the source's: each pass only moves pixels, so with wrap every count must match. */
import type { ColourCount } from "../../bench/framePainter.ts";

const MAX_ROWS = 16;

export function PaletteHistogram({ source, frame, indexed }: { source: ColourCount[]; frame: ColourCount[] | null; indexed: boolean }) {
  const inFrame = new Map((frame ?? []).map((c) => [c.key, c.count]));
  const keys = new Set([...source.map((c) => c.key), ...(frame ?? []).map((c) => c.key)]);
  const byKey = new Map([...(frame ?? []), ...source].map((c) => [c.key, c]));
  const rows = [...keys]
    .map((key) => ({ colour: byKey.get(key)!, before: source.find((c) => c.key === key)?.count ?? 0, after: inFrame.get(key) ?? 0 }))
    .filter((r) => r.before > 0 || r.after > 0)
    .sort((a, b) => (indexed ? a.colour.key - b.colour.key : b.before - a.before));
  const shown = rows.slice(0, MAX_ROWS);
  const most = Math.max(1, ...rows.map((r) => Math.max(r.before, r.after)));
  const changed = rows.filter((r) => !r.colour.background && r.before !== r.after);
  const kept = rows.filter((r) => !r.colour.background).reduce((n, r) => n + r.before, 0);
  return (
    <div data-testid="palette-histogram">
      {frame ? (
        changed.length === 0 ? (
          <p className="mb-2 text-xs text-glass-300" data-testid="pixels-survived">
            Every pixel survived: the frame holds the same number of each colour as the source ({kept.toLocaleString("en")} pixels besides
            the background).
          </p>
        ) : (
          <p className="mb-2 text-xs text-alert-300" data-testid="pixels-lost">
            {changed.length} colour{changed.length === 1 ? "" : "s"} changed count: pixels were dropped at the edge (clip), so the frame
            holds fewer.
          </p>
        )
      ) : null}
      <table className="w-full text-xs">
        <caption className="sr-only">Pixels of each colour, in the source and in this frame</caption>
        <thead className="text-ink-400">
          <tr>
            <th scope="col" className="py-1 pr-3 text-left font-medium">
              Colour
            </th>
            <th scope="col" className="py-1 pl-3 text-right font-medium">
              Source
            </th>
            <th scope="col" className="py-1 pl-3 text-right font-medium">
              Frame
            </th>
            <th scope="col" className="w-2/5 py-1 pl-3">
              <span className="sr-only">Bars</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {shown.map(({ colour, before, after }) => (
            <tr key={colour.key} className={before !== after && !colour.background ? "text-alert-300" : "text-ink-200"}>
              <td className="py-0.5 pr-3">
                <span className="inline-flex items-center gap-1.5">
                  <span
                    className="inline-block h-3 w-3 rounded-sm border border-ink-500 bg-[repeating-conic-gradient(#3b4752_0_25%,#12181e_0_50%)] bg-[length:6px_6px]"
                    aria-hidden="true"
                  >
                    <span className="block h-full w-full" style={{ background: colour.css }} />
                  </span>
                  <span className="num">{indexed ? `index ${colour.key}` : colour.css}</span>
                  {colour.background ? <span className="text-ink-400">background</span> : null}
                </span>
              </td>
              <td className="num py-0.5 pl-3 text-right">{before}</td>
              <td className="num py-0.5 pl-3 text-right">{frame ? after : "…"}</td>
              <td className="py-0.5 pl-3" aria-hidden="true">
                <div className="h-1.5 rounded-sm bg-ink-500" style={{ width: `${(before / most) * 100}%` }} />
                <div className="mt-px h-1.5 rounded-sm bg-glass-400" style={{ width: `${(after / most) * 100}%` }} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {rows.length > MAX_ROWS ? <p className="mt-1 text-xs text-ink-400">… and {rows.length - MAX_ROWS} more colours.</p> : null}
      <p className="mt-1 text-xs text-ink-400">
        <span className="mr-1 inline-block h-1.5 w-4 rounded-sm bg-ink-500 align-middle" aria-hidden="true" />
        source
        <span className="mr-1 ml-3 inline-block h-1.5 w-4 rounded-sm bg-glass-400 align-middle" aria-hidden="true" />
        this frame
      </p>
    </div>
  );
}
