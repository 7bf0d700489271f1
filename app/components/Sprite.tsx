import type { ComponentProps } from "react";

export interface SpriteView {
  id: string;
  name: string;
  width: number;
  height: number;
  colours: number;
}

/** A sprite's picture, pixels kept square-edged, on a checkerboard so its transparent pixels show. */
export function SpriteImage({ sprite, className, ...props }: { sprite: SpriteView } & ComponentProps<"img">) {
  return (
    <img
      src={`/sprites/${sprite.id}/image.png`}
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
        {sprite.width} × {sprite.height} px · {sprite.colours} colours
      </div>
    </>
  );
}
