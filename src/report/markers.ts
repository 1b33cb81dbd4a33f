import type { MarkerShape } from './palette.ts';
import { el, escapeXml } from './xml.ts';

const r2 = (v: number) => Math.round(v * 100) / 100;

function polygon(points: [number, number][], attrs: Record<string, string | number>, body: string): string {
  return el('polygon', { ...attrs, points: points.map(([x, y]) => `${r2(x)},${r2(y)}`).join(' ') }, body);
}

/** One marker of the given shape centred at (x, y) with "radius" r; hollow ones have a white fill; `title` becomes a tooltip. */
export function marker(shape: MarkerShape, x: number, y: number, r: number, color: string, hollow: boolean, cls: string, title = ''): string {
  const body = title === '' ? '' : el('title', {}, escapeXml(title));
  const attrs = { class: cls, fill: hollow ? '#ffffff' : color, stroke: color, 'stroke-width': 1.5 };
  switch (shape) {
    case 'circle':
      return el('circle', { ...attrs, cx: r2(x), cy: r2(y), r: r2(r) }, body);
    case 'square': {
      const s = r * 0.9;
      return el('rect', { ...attrs, x: r2(x - s), y: r2(y - s), width: r2(2 * s), height: r2(2 * s) }, body);
    }
    case 'triangle':
      return polygon([[x, y - 1.2 * r], [x + 1.1 * r, y + 0.8 * r], [x - 1.1 * r, y + 0.8 * r]], attrs, body);
    case 'triangle-down':
      return polygon([[x, y + 1.2 * r], [x + 1.1 * r, y - 0.8 * r], [x - 1.1 * r, y - 0.8 * r]], attrs, body);
    case 'diamond':
      return polygon([[x, y - 1.3 * r], [x + 1.1 * r, y], [x, y + 1.3 * r], [x - 1.1 * r, y]], attrs, body);
    case 'cross': {
      const a = r * 0.45;
      const b = r * 1.15;
      return polygon(
        [[x - a, y - b], [x + a, y - b], [x + a, y - a], [x + b, y - a], [x + b, y + a], [x + a, y + a],
         [x + a, y + b], [x - a, y + b], [x - a, y + a], [x - b, y + a], [x - b, y - a], [x - a, y - a]],
        attrs,
        body,
      );
    }
  }
}
