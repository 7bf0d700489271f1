import type { ComponentProps } from "react";

export interface SpriteView {
  id: string;
  name: string;
  width: number;
  height: number;
  colours: number;
  /** Indexed (palette) or RGBA; counted as indexed when not given. */
  kind?: "indexed" | "rgba";
  /** Bumped when the picture is replaced; part of the image address so no browser shows a cached old picture. */
  version?: number;
}

/** The address of a sprite's PNG file (as uploaded), for <img> and downloads. */
export function spriteImageUrl(sprite: { id: string; version?: number }): string {
  return `/sprites/${sprite.id}/image.png${sprite.version ? `?v=${sprite.version}` : ""}`;
}

/** A sprite's picture, pixels kept square-edged, on a checkerboard so its transparent pixels show. */
export function SpriteImage({ sprite, className, ...props }: { sprite: SpriteView } & ComponentProps<"img">) {
  return (
    <img
      src={spriteImageUrl(sprite)}
      alt={`Sprite ${sprite.name}`}
      {...props}
      className={`pixelated rounded border border-ink-700 bg-[repeating-conic-gradient(#1d252d_0_25%,#12181e_0_50%)] bg-[length:8px_8px] ${className ?? ""}`}
    />
  );
}

/** A sprite's name, then its size in pixels and its number of colours. */
export function SpriteFacts({ sprite }: { sprite: SpriteView }) {
  return (
    <>
      <div className="text-ink-100">{sprite.name}</div>
      <div className="num text-xs text-ink-400">
        {sprite.width} × {sprite.height} px · {sprite.kind === "rgba" ? "RGBA" : `${sprite.colours} colours`}
      </div>
    </>
  );
}
