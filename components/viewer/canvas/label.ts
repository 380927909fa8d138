import { CanvasTexture, LinearFilter, Sprite, SpriteMaterial } from 'three';

export type LabelStyle = { color?: string; background?: string; border?: string; bold?: boolean };

/**
 * A text label that always faces the camera: a sprite with the text drawn on a 2D canvas. `heightM` is its height in
 * scene metres; it draws over the model (no depth test) so a label is never hidden behind the base.
 */
export function makeLabel(text: string, heightM: number, style: LabelStyle = {}): Sprite {
  const px = 56;
  const pad = 14;
  const canvas = document.createElement('canvas');
  const ctx = canvas.getContext('2d')!;
  const font = `${style.bold === false ? 500 : 700} ${px}px "Atkinson Hyperlegible Next Variable", system-ui, sans-serif`;
  ctx.font = font;
  const w = Math.ceil(ctx.measureText(text).width) + pad * 2;
  const h = px + pad * 2;
  canvas.width = w;
  canvas.height = h;
  ctx.font = font;
  if (style.background) {
    ctx.fillStyle = style.background;
    roundRect(ctx, 2, 2, w - 4, h - 4, 16);
    ctx.fill();
    if (style.border) {
      ctx.lineWidth = 4;
      ctx.strokeStyle = style.border;
      ctx.stroke();
    }
  }
  ctx.fillStyle = style.color ?? '#14171b';
  ctx.textBaseline = 'middle';
  ctx.fillText(text, pad, h / 2 + 2);
  const texture = new CanvasTexture(canvas);
  texture.minFilter = LinearFilter;
  const material = new SpriteMaterial({ map: texture, depthTest: false, transparent: true });
  const sprite = new Sprite(material);
  sprite.scale.set((heightM * w) / h, heightM, 1);
  sprite.renderOrder = 10;
  return sprite;
}

/** Frees a label's texture and material. */
export function disposeLabel(sprite: Sprite) {
  sprite.material.map?.dispose();
  sprite.material.dispose();
}

function roundRect(ctx: CanvasRenderingContext2D, x: number, y: number, w: number, h: number, r: number) {
  ctx.beginPath();
  ctx.moveTo(x + r, y);
  ctx.arcTo(x + w, y, x + w, y + h, r);
  ctx.arcTo(x + w, y + h, x, y + h, r);
  ctx.arcTo(x, y + h, x, y, r);
  ctx.arcTo(x, y, x + w, y, r);
  ctx.closePath();
}
