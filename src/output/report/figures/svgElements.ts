import { escapeHtml } from "../escapeHtml.js";

/**
 * Small builders for hand-written SVG 1.1. Coordinates are rounded to two
 * decimals so files stay small and identical across runs; every text is
 * escaped. No element carries an id, so several figures can be inlined in one
 * HTML page without clashes.
 */
export const FONT = "Helvetica, Arial, sans-serif";

/** A coordinate or length: at most two decimals, no trailing zeros. */
export function n(value: number): string {
  const rounded = Math.round(value * 100) / 100;
  return String(Object.is(rounded, -0) ? 0 : rounded);
}

export interface TextOptions {
  anchor?: "start" | "middle" | "end";
  size?: number;
  weight?: "bold";
  fill?: string;
  rotate?: number;
  baseline?: "middle" | "hanging";
}

export function text(x: number, y: number, content: string, options: TextOptions = {}): string {
  const attributes = [`x="${n(x)}"`, `y="${n(y)}"`];
  if (options.anchor && options.anchor !== "start") attributes.push(`text-anchor="${options.anchor}"`);
  if (options.size) attributes.push(`font-size="${n(options.size)}"`);
  if (options.weight) attributes.push(`font-weight="${options.weight}"`);
  if (options.fill) attributes.push(`fill="${options.fill}"`);
  if (options.baseline) attributes.push(`dominant-baseline="${options.baseline}"`);
  if (options.rotate) attributes.push(`transform="rotate(${n(options.rotate)} ${n(x)} ${n(y)})"`);
  return `<text ${attributes.join(" ")}>${escapeHtml(content)}</text>`;
}

export function line(x1: number, y1: number, x2: number, y2: number, stroke: string, width = 1, extra = ""): string {
  return `<line x1="${n(x1)}" y1="${n(y1)}" x2="${n(x2)}" y2="${n(y2)}" stroke="${stroke}" stroke-width="${n(width)}"${extra ? ` ${extra}` : ""}/>`;
}

export function rect(x: number, y: number, width: number, height: number, fill: string, extra = ""): string {
  return `<rect x="${n(x)}" y="${n(y)}" width="${n(width)}" height="${n(height)}" fill="${fill}"${extra ? ` ${extra}` : ""}/>`;
}

export function circle(cx: number, cy: number, r: number, fill: string, extra = ""): string {
  return `<circle cx="${n(cx)}" cy="${n(cy)}" r="${n(r)}" fill="${fill}"${extra ? ` ${extra}` : ""}/>`;
}

/** Round tick values covering [low, high]: steps of 1, 2 or 5 × 10^k, about `count` of them. */
export function niceTicks(low: number, high: number, count = 5): number[] {
  if (!(high > low)) return [low];
  const raw = (high - low) / count;
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let v = Math.ceil(low / step) * step; v <= high + step * 1e-9; v += step) ticks.push(Math.round(v / step) * step);
  return ticks;
}

/** A tick value as text: integers plainly, others with the decimals the step needs. */
export function tickLabel(value: number, step: number): string {
  const decimals = step >= 1 ? 0 : Math.min(6, Math.ceil(-Math.log10(step)));
  return value.toFixed(decimals).replace(/^-(0\.?0*)$/, "$1");
}

/** Shortens a label to `max` characters with an ellipsis. */
export function clip(label: string, max: number): string {
  return label.length <= max ? label : `${label.slice(0, Math.max(1, max - 1))}…`;
}

/** A text element drawn over a white outline, so it stays legible on top of lines and bars. */
export function halo(textElement: string): string {
  return textElement.replace("<text ", '<text stroke="#ffffff" stroke-width="2.6" paint-order="stroke" stroke-linejoin="round" ');
}
