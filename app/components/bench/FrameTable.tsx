/** The per-frame table: angles, flip, coefficients, errors, wrapped, clipped, saturated, key pixels; sortable, a row jumps there. */
import { memo, useEffect, useMemo, useRef, useState, useSyncExternalStore } from "react";
import type { FrameRow } from "../../bench/trackDiagnosis.ts";

type SortKey = "index" | "written" | "alpha" | "beta" | "maxErrorPx" | "meanErrorPx" | "wrapped" | "clipped" | "keyMaxErrorPx" | "keyApart";

/** A number of degrees or pixels, short: whole numbers plain, others to `digits` places without trailing zeros. */
export function short(n: number, digits = 3): string {
  if (Number.isInteger(n)) return String(n);
  return n.toFixed(digits).replace(/\.?0+$/, "");
}

const COLUMNS: { key: SortKey | null; label: string; title?: string; right?: boolean }[] = [
  { key: "index", label: "Frame", right: true },
  { key: "written", label: "Angle", title: "as the track gives it; the normalised and residual angles show where they differ" },
  { key: null, label: "Flip", title: "half-turn flip: the frame mirrors both axes first, then the shears turn the rest" },
  { key: "alpha", label: "kα", right: true },
  { key: "beta", label: "kβ", right: true },
  { key: "maxErrorPx", label: "Max err", right: true, title: "largest distance from the ideal spot, in pixels" },
  { key: "meanErrorPx", label: "Mean err", right: true, title: "mean distance from the ideal spot, in pixels" },
  { key: "wrapped", label: "Wrapped", right: true },
  { key: "clipped", label: "Clipped", right: true },
  { key: null, label: "Sat.", title: "saturated: kα or kβ did not fit the fixed-point format" },
];

const KEY_COLUMNS: typeof COLUMNS = [
  { key: "keyMaxErrorPx", label: "Key err", right: true, title: "largest error over the key pixels, in pixels" },
  { key: "keyApart", label: "Keys apart", right: true, title: "pairs of touching key pixels that no longer touch" },
];

/**
 * Rows the first render draws (on the server, and in the browser while it takes the page over): the region shows about
 * twenty at a time. The rest follow right after, in the browser; rendering every row of a long track on the server
 * was most of an effect page's rendering time, for rows nobody sees before the page is live.
 */
export const FIRST_ROWS = 20;
const NO_SUBSCRIPTION = () => () => {};
const LIVE = () => true;
const NOT_LIVE = () => false;

function troubled(row: FrameRow): boolean {
  return row.wrapped > 0 || row.clipped > 0 || row.saturated;
}

const Row = memo(function Row({
  row,
  current,
  keys,
  onJump,
}: {
  row: FrameRow;
  current: boolean;
  keys: boolean;
  onJump: (i: number) => void;
}) {
  const normalisedDiffers = Math.abs(row.written - row.degrees) > 1e-9;
  const bad = troubled(row);
  return (
    <tr
      onClick={() => onJump(row.index)}
      aria-current={current ? "true" : undefined}
      data-frame={row.index}
      data-trouble={bad ? "true" : undefined}
      className={`cursor-pointer border-b border-ink-800 ${current ? "bg-glass-900/70" : bad ? "bg-alert-900/35 hover:bg-alert-900/60" : "hover:bg-ink-850"}`}
    >
      <td className={`px-1.5 py-1 text-right ${bad ? "border-l-2 border-alert-400" : "border-l-2 border-transparent"}`}>
        <button
          type="button"
          className="num cursor-pointer rounded px-1 text-ink-100 hover:text-glass-300"
          onClick={(e) => (e.stopPropagation(), onJump(row.index))}
          aria-label={`Go to frame ${row.index}`}
        >
          {row.index}
        </button>
      </td>
      <td className="num px-1.5 py-1 whitespace-nowrap">
        {short(row.written, 4)}°{normalisedDiffers ? <span className="ml-1 text-ink-400">= {short(row.degrees, 4)}°</span> : null}
      </td>
      <td className="num px-1.5 py-1 whitespace-nowrap text-ink-300">{row.flip ? `yes, then ${short(row.residualDegrees, 3)}°` : ""}</td>
      <td className="num px-1.5 py-1 text-right">{row.alpha}</td>
      <td className="num px-1.5 py-1 text-right">{row.beta}</td>
      <td className="num px-1.5 py-1 text-right">{row.maxErrorPx.toFixed(3)}</td>
      <td className="num px-1.5 py-1 text-right">{row.meanErrorPx.toFixed(3)}</td>
      <td className={`num px-1.5 py-1 text-right ${row.wrapped ? "font-semibold text-alert-300" : "text-ink-500"}`}>{row.wrapped}</td>
      <td className={`num px-1.5 py-1 text-right ${row.clipped ? "font-semibold text-alert-300" : "text-ink-500"}`}>{row.clipped}</td>
      <td className={`px-1.5 py-1 ${row.saturated ? "font-semibold text-alert-300" : ""}`}>{row.saturated ? "yes" : ""}</td>
      {keys ? (
        <>
          <td className="num px-1.5 py-1 text-right">{row.keyMaxErrorPx === null ? "" : row.keyMaxErrorPx.toFixed(3)}</td>
          <td className={`num px-1.5 py-1 text-right ${row.keyApart ? "font-semibold text-alert-300" : "text-ink-500"}`}>
            {row.keyApart ?? ""}
          </td>
        </>
      ) : null}
    </tr>
  );
});

export function FrameTable({
  rows,
  total,
  current,
  onJump,
  heading,
  following,
}: {
  rows: FrameRow[];
  total: number;
  current: number;
  onJump: (frame: number) => void;
  heading: string;
  /** Keep the current row in view (off while playing, so the table does not scroll under the reader). */
  following: boolean;
}) {
  const [sort, setSort] = useState<{ key: SortKey; dir: 1 | -1 }>({ key: "index", dir: 1 });
  const keys = rows.some((r) => r.keyMaxErrorPx !== null);
  const columns = keys ? [...COLUMNS, ...KEY_COLUMNS] : COLUMNS;
  const sorted = useMemo(() => {
    if (sort.key === "index" && sort.dir === 1) return rows;
    const k = sort.key;
    return [...rows].sort((a, b) => (((a[k] ?? -1) as number) - ((b[k] ?? -1) as number)) * sort.dir || a.index - b.index);
  }, [rows, sort]);
  const body = useRef<HTMLDivElement>(null);
  // False on the server and while the browser hydrates the server's rows; true right after, and on a page drawn in the browser.
  const live = useSyncExternalStore(NO_SUBSCRIPTION, LIVE, NOT_LIVE);
  const shown = live || sorted.length <= FIRST_ROWS ? sorted : sorted.slice(0, FIRST_ROWS);

  useEffect(() => {
    if (!following || !body.current) return;
    const row = body.current.querySelector<HTMLElement>(`tr[data-frame="${current}"]`);
    if (!row) return;
    const box = body.current.getBoundingClientRect();
    const r = row.getBoundingClientRect();
    if (r.top < box.top + 32 || r.bottom > box.bottom) body.current.scrollTop += r.top - box.top - box.height / 2;
  }, [current, following, sorted]);

  return (
    <div>
      <h3 className="mb-2 text-xs text-ink-300" id="frame-table-heading">
        {heading}
        {rows.length < total ? (
          <span className="ml-2 text-glass-300">
            measuring… {rows.length} of {total} frames
          </span>
        ) : null}
      </h3>
      <div
        ref={body}
        className="max-h-[30rem] overflow-auto rounded-md border border-ink-700"
        tabIndex={0}
        role="region"
        aria-labelledby="frame-table-heading"
      >
        <table className="w-full border-collapse text-xs" data-testid="frame-table" aria-labelledby="frame-table-heading">
          <thead className="sticky top-0 z-10 bg-ink-850 text-ink-300">
            <tr>
              {columns.map((c) => (
                <th
                  key={c.label}
                  scope="col"
                  className={`px-1.5 py-1.5 font-medium whitespace-nowrap ${c.right ? "text-right" : "text-left"}`}
                  aria-sort={c.key && sort.key === c.key ? (sort.dir === 1 ? "ascending" : "descending") : undefined}
                  title={c.title}
                >
                  {c.key ? (
                    <button
                      type="button"
                      className="inline-flex cursor-pointer items-center gap-1 hover:text-glass-300"
                      onClick={() =>
                        setSort((s) => ({
                          key: c.key!,
                          dir: s.key === c.key ? (-s.dir as 1 | -1) : c.key === "index" || c.key === "written" ? 1 : -1,
                        }))
                      }
                    >
                      {c.label}
                      <span aria-hidden="true" className="text-[10px]">
                        {sort.key === c.key ? (sort.dir === 1 ? "▲" : "▼") : "↕"}
                      </span>
                    </button>
                  ) : (
                    c.label
                  )}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {shown.map((row) => (
              <Row key={row.index} row={row} current={row.index === current} keys={keys} onJump={onJump} />
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
