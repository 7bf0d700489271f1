/** A name as the stem of a download's file name: lower-case letters, digits and dashes ("Compass rose" → "compass-rose"). */
export function fileSlug(name: string, fallback = "file"): string {
  return (
    name
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "") || fallback
  );
}
