/** What the overlays' colours and marks mean, shown for the overlays that are on. */
import { ERROR_BANDS, MARK_COLOURS, type Overlays } from "../../bench/draw.ts";
import type { FramePicture } from "../../bench/framePainter.ts";

function Swatch({ colour, outline }: { colour: string; outline?: boolean }) {
  return (
    <span
      aria-hidden="true"
      className="inline-block h-3 w-3 rounded-sm align-middle"
      style={outline ? { border: `2px solid ${colour}` } : { background: colour }}
    />
  );
}

export function Legend({
  overlays,
  picture,
  pass,
  edges,
}: {
  overlays: Overlays;
  picture: FramePicture | null;
  pass: number;
  edges: "wrap" | "clip";
}) {
  const items: React.ReactNode[] = [];
  if (overlays.error)
    items.push(
      pass === 3 ? (
        <div key="error" className="flex flex-wrap items-center gap-x-3 gap-y-1" data-testid="error-legend">
          <span>Error from the ideal spot:</span>
          {ERROR_BANDS.map((b) => (
            <span key={b.label} className="inline-flex items-center gap-1">
              <Swatch colour={`rgb(${b.rgb.join(",")})`} /> {b.label}
            </span>
          ))}
          {picture ? <span className="num text-ink-300">largest on this frame {picture.maxErrorPx.toFixed(3)} px</span> : null}
        </div>
      ) : (
        <span key="error">Error shading shows on the finished frame (pass 3).</span>
      ),
    );
  if (overlays.ideal)
    items.push(
      <span key="ideal" className="inline-flex items-center gap-1">
        <Swatch colour={MARK_COLOURS.ideal} /> ideal turn: the outline of the counted pixels turned exactly
      </span>,
    );
  if (overlays.marks)
    items.push(
      <span key="marks" className="inline-flex items-center gap-1">
        <Swatch colour={MARK_COLOURS.wrapped} />
        {edges === "wrap"
          ? `wrapped: pixels that crossed an edge on the way here (${picture?.wrappedCount ?? 0} on this pass)`
          : `× clipped: where the ideal turn would put the pixels dropped at the edge (${picture?.lostCount ?? 0})`}
      </span>,
    );
  if (overlays.keys)
    items.push(
      <span key="keys" className="inline-flex items-center gap-1">
        <Swatch colour={MARK_COLOURS.key} outline /> key pixels
      </span>,
    );
  if (overlays.pivot)
    items.push(
      <span key="pivot" className="inline-flex items-center gap-1">
        <Swatch colour={MARK_COLOURS.pivot} /> pivot: a dot in a pixel's centre, a ring with a cross on a corner
      </span>,
    );
  if (overlays.edge)
    items.push(
      <span key="edge" className="inline-flex items-center gap-1">
        <Swatch colour={MARK_COLOURS.edge} outline /> canvas edge
      </span>,
    );
  if (items.length === 0) return null;
  return <div className="flex flex-col gap-1 text-xs text-ink-200">{items}</div>;
}
