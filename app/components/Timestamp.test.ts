import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { Timestamp } from "./ui.tsx";

const render = (value: Date | string) => renderToStaticMarkup(createElement(Timestamp, { value }));

describe("Timestamp", () => {
  it("prints the moment in UTC, with its ISO form for machines, whether given a Date or its text", () => {
    // The expected text is Intl's en-GB day-month-year, 24-hour clock (ECMA-402), formatted here independently.
    const at = new Date(Date.UTC(2026, 11, 4, 1, 7, 30, 250));
    const expected = new Intl.DateTimeFormat("en-GB", {
      day: "numeric",
      month: "short",
      year: "numeric",
      hour: "2-digit",
      minute: "2-digit",
      timeZone: "UTC",
    }).format(at);
    const html = render(at);
    expect(html).toContain(`dateTime="2026-12-04T01:07:30.250Z"`);
    expect(html).toContain(`>${expected} UTC</time>`);
    expect(render(at.toISOString())).toBe(html);
  });

  it("shows each moment its own text, the same again when shown again", () => {
    const a = render(new Date(Date.UTC(2026, 0, 1, 0, 0)));
    const b = render(new Date(Date.UTC(2026, 0, 1, 0, 1)));
    expect(a).not.toBe(b);
    expect(render(new Date(Date.UTC(2026, 0, 1, 0, 0)))).toBe(a);
    expect(b).toContain("00:01");
  });
});
