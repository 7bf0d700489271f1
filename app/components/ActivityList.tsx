import { EmptyState, Timestamp } from "./ui.tsx";

export interface ActivityView {
  id: number;
  summary: string;
  createdAt: Date | string;
  who: string | null;
}

export function ActivityList({ items }: { items: ActivityView[] }) {
  if (items.length === 0) return <EmptyState title="Nothing has happened here yet" />;
  return (
    <ol className="flex flex-col gap-2 text-sm">
      {items.map((a) => (
        <li key={a.id} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-0.5">
          <span className="text-ink-200">
            <span className="font-medium text-ink-100">{a.who ?? "Someone"}</span> {a.summary}
          </span>
          <Timestamp value={a.createdAt} />
        </li>
      ))}
    </ol>
  );
}
