import { Renderer, type PixelData } from "@skewsmith/core";

/** A Renderer for the plane type of `plane`, made on first use and reused. */
export class Renderers {
  private byType = new Map<string, Renderer<PixelData>>();
  constructor(
    readonly width: number,
    readonly height: number,
  ) {}
  for<T extends PixelData>(plane: T): Renderer<T> {
    const name = plane.constructor.name;
    let renderer = this.byType.get(name);
    if (!renderer) {
      renderer = new Renderer(this.width, this.height, plane.constructor as { new (n: number): T });
      this.byType.set(name, renderer);
    }
    return renderer as unknown as Renderer<T>;
  }
}
