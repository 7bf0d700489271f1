import { Link } from "react-router";
import { qNotation } from "../effects/display.ts";
import type { ProfileSettings } from "../effects/settings.ts";
import { ColumnHeader, EmptyState, TABLE, TCELL, THEAD, TROW } from "./ui.tsx";

export interface ProfileView extends ProfileSettings {
  id: string;
  name: string;
  description: string;
  dialects: string[];
  labelPrefix: string;
  effectCount: number;
}

export function ProfilesTable({
  profiles,
  emptyHint,
  countLabel = "Effects",
  teamId,
}: {
  profiles: ProfileView[];
  emptyHint: string;
  countLabel?: string;
  /** When given, each profile's name links to its page under this team. */
  teamId?: string;
}) {
  if (profiles.length === 0) return <EmptyState title="No target profiles">{emptyHint}</EmptyState>;
  return (
    <div className="overflow-x-auto">
      <table className={TABLE} data-testid="profiles-table">
        <thead className={THEAD}>
          <tr>
            <ColumnHeader label="Profile" />
            <ColumnHeader label="Canvas" />
            <ColumnHeader label="Fixed point" />
            <ColumnHeader label="Rounding" />
            <ColumnHeader label="Half-turn" />
            <ColumnHeader label="Edges" />
            <ColumnHeader label="Column group" align="right" />
            <ColumnHeader label="Export" />
            <ColumnHeader label={countLabel} align="right" />
          </tr>
        </thead>
        <tbody>
          {profiles.map((p) => (
            <tr key={p.id} className={TROW} data-testid={`profile-row-${p.name}`}>
              <td className={TCELL}>
                {teamId ? (
                  <Link to={`/teams/${teamId}/profiles/${p.id}`} className="font-medium text-ink-100 hover:text-glass-300">
                    {p.name}
                  </Link>
                ) : (
                  <span className="font-medium text-ink-100">{p.name}</span>
                )}
                {p.description ? <div className="max-w-72 text-xs text-ink-400">{p.description}</div> : null}
              </td>
              <td className={`${TCELL} num`}>
                {p.canvasWidth} × {p.canvasHeight}
              </td>
              <td className={`${TCELL} num`} title={`${p.fixedPointBits} bits, ${p.fixedPointFraction} of them fraction`}>
                {qNotation({ bits: p.fixedPointBits, fraction: p.fixedPointFraction })}
              </td>
              <td className={`${TCELL} text-ink-300`}>{p.rounding}</td>
              <td className={`${TCELL} text-ink-300`}>{p.halfTurn}</td>
              <td className={`${TCELL} text-ink-300`}>{p.edges}</td>
              <td className={`${TCELL} num text-right`}>{p.columnGroup}</td>
              <td className={`${TCELL} text-ink-300`}>
                {p.dialects.length ? p.dialects.join(", ") : "—"}
                {p.labelPrefix ? <span className="num ml-1 text-ink-500">{p.labelPrefix}*</span> : null}
              </td>
              <td className={`${TCELL} num text-right`}>{p.effectCount}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
