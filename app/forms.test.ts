import { describe, expect, it } from "vitest";
import { z } from "zod";
import { createTeamForm, descriptionText, nameText, parseForm, projectDetailsForm, renameEffectForm } from "./forms.ts";
import { targetProfileInput } from "./effects/settings.ts";
import { PROFILE_FORM } from "../tests/factories.ts";

const form = (entries: [string, string | Blob][]) => {
  const f = new FormData();
  for (const [k, v] of entries) f.append(k, v);
  return f;
};

describe("parseForm", () => {
  it("reads the schema's fields, ignoring others", () => {
    expect(
      parseForm(
        createTeamForm,
        form([
          ["name", " Pier Nine "],
          ["intent", "create-team"],
          ["extra", "x"],
        ]),
      ),
    ).toEqual({
      ok: true,
      data: { name: "Pier Nine" },
    });
  });

  it("refuses a field sent twice, rather than silently keeping one of the values", () => {
    expect(
      parseForm(
        createTeamForm,
        form([
          ["name", "One"],
          ["name", "Two"],
        ]),
      ),
    ).toEqual({
      ok: false,
      errors: { name: "The form sent “name” 2 times; it takes one value." },
    });
  });

  it("keeps every value of a field that takes a list", () => {
    const schema = z.object({ tags: z.array(z.string()).default([]) });
    expect(
      parseForm(
        schema,
        form([
          ["tags", "a"],
          ["tags", "b"],
        ]),
      ),
    ).toEqual({ ok: true, data: { tags: ["a", "b"] } });
  });

  it("refuses a file where text belongs", () => {
    expect(parseForm(createTeamForm, form([["name", new Blob(["x"])]]))).toEqual({
      ok: false,
      errors: { name: "“name” must be text, not a file." },
    });
  });

  it("treats fields called __proto__ or constructor as plain, unknown fields", () => {
    const parsed = parseForm(
      createTeamForm,
      form([
        ["__proto__", "x"],
        ["constructor", "y"],
        ["name", "Team"],
      ]),
    );
    expect(parsed).toEqual({ ok: true, data: { name: "Team" } });
    expect(({} as Record<string, unknown>).x).toBeUndefined();
  });

  it("asks for the version a change starts from, as a whole number of 1 or more", () => {
    const base: [string, string][] = [
      ["effectId", "6f1c2a9e-1b2c-4d3e-8f90-123456789abc"],
      ["name", "Beam"],
    ];
    expect(parseForm(renameEffectForm, form([...base, ["version", "3"]]))).toMatchObject({ ok: true, data: { version: 3 } });
    for (const bad of ["0", "-1", "1.5", "NaN", "", "1e99", "x"])
      expect(parseForm(renameEffectForm, form([...base, ["version", bad]])), bad).toMatchObject({
        ok: false,
        errors: { version: expect.any(String) },
      });
    expect(parseForm(projectDetailsForm, form([["name", "P"]]))).toMatchObject({
      ok: false,
      errors: { version: expect.stringMatching(/version/) },
    });
  });
});

describe("the one text rule", () => {
  const name = nameText("effect");
  const description = descriptionText();
  it("refuses control and bidirectional characters in names, and controls other than tab and line breaks in descriptions", () => {
    for (const bad of ["a\u0000b", "a\tb", "a\nb", "\u202eevil", "a\u2066b", "a\u200fb", "a\u0085b", "a\u007fb"])
      expect(name.safeParse(bad).success, JSON.stringify(bad)).toBe(false);
    expect(name.safeParse("Ünïcødé ☃ 回転").success).toBe(true);
    expect(description.safeParse("line one\nline two\ttab").success).toBe(true);
    for (const bad of ["a\u0000b", "a\u001bb", "a\u0008b"]) expect(description.safeParse(bad).success).toBe(false);
  });

  it("is the rule of target profile names and descriptions too", () => {
    const valid = { ...PROFILE_FORM, name: "Wide" };
    expect(targetProfileInput.safeParse(valid).success).toBe(true);
    expect(targetProfileInput.safeParse({ ...valid, name: "Wide\u202e" }).success).toBe(false);
    expect(targetProfileInput.safeParse({ ...valid, description: "x\u0000" }).success).toBe(false);
    expect(targetProfileInput.safeParse({ ...valid, dialects: ["ca\n65"] }).success).toBe(false);
  });
});
