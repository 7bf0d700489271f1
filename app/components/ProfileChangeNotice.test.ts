import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { MemoryRouter } from "react-router";
import { describe, expect, it } from "vitest";
import { ProfileChangeNotice, type ProfileChangeNoticeView } from "./ProfileChangeNotice.tsx";

const render = (change: ProfileChangeNoticeView | null) =>
  renderToStaticMarkup(createElement(MemoryRouter, null, createElement(ProfileChangeNotice, { change, teamId: "team-1" })));

describe("ProfileChangeNotice", () => {
  it("says which profile changed, who, when, and each setting before and after", () => {
    const html = render({
      profileId: "profile-1",
      profileName: "Storm screen",
      profileVersion: 4,
      effectVersion: 9,
      changes: [{ field: "canvas", label: "Canvas", from: "256 × 224", to: "320 × 224" }],
      changedAt: "2026-03-01T10:30:00.000Z",
      changedBy: "Oren",
    });
    const text = html.replace(/<[^>]+>/g, "");
    expect(text).toContain(
      "Target profile Storm screen (version 4) changed by Oren on 1 Mar 2026, 10:30 UTC; this effect is at version 9 since.",
    );
    expect(text).toContain("Canvas256 × 224→became320 × 224");
    expect(html).toContain('href="/teams/team-1/profiles/profile-1"');
  });

  it("names a deleted profile without a link, and shows nothing when no change reached the effect", () => {
    const html = render({
      profileId: null,
      profileName: "Gone",
      profileVersion: 2,
      effectVersion: 3,
      changes: [{ field: "profile", label: "Target profile", from: "Gone", to: "deleted: the effect keeps its own settings" }],
      changedAt: new Date("2026-03-01T10:30:00Z"),
      changedBy: null,
    });
    expect(html).not.toContain("href=");
    expect(html).toContain("deleted: the effect keeps its own settings");
    expect(render(null)).toBe("");
  });
});
