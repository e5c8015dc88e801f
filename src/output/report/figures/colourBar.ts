import { scaleColour } from "./colourScale.js";
import { line, n, rect, text } from "./svgElements.js";

/** A horizontal colour bar from −limit (0 when not `signed`) to +limit, ticked at both ends and zero, with its label (font sizes: label, ticks). */
export function colourBar(x: number, y: number, width: number, height: number, limit: number, label: string, signed = true, sizes: [number, number] = [10, 9]): string[] {
  const steps = 64;
  const out: string[] = [];
  for (let k = 0; k < steps; k++) {
    // Each slice overlaps the next by a hair so no seam shows.
    out.push(rect(x + (k * width) / steps, y, width / steps + 0.3, height, scaleColour((k + 0.5) / steps)));
  }
  out.push(`<rect x="${n(x)}" y="${n(y)}" width="${n(width)}" height="${n(height)}" fill="none" stroke="#333333" stroke-width="0.6"/>`);
  const ticks: [number, string][] = signed
    ? [
        [x, (-limit).toFixed(1)],
        [x + width / 2, "0"],
        [x + width, limit.toFixed(1)],
      ]
    : [
        [x, "0"],
        [x + width, limit.toFixed(1)],
      ];
  for (const [tx, value] of ticks) {
    out.push(line(tx, y + height, tx, y + height + 3, "#333333", 0.8));
    out.push(text(tx, y + height + 4 + sizes[1], value, { anchor: "middle", size: sizes[1] }));
  }
  out.push(text(x + width / 2, y - 4, label, { anchor: "middle", size: sizes[0] }));
  return out;
}
