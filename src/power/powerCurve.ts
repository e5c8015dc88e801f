import type { PowerEstimate } from "./powerStudy.js";

/** Power curves over sample size, one line per method, with the target marked (plain SVG; lines differ in dash as well as colour). */
export function powerCurveSvg(estimates: PowerEstimate[], target: number): string {
  const width = 560;
  const height = 320;
  const left = 56;
  const right = 150;
  const top = 20;
  const bottom = 48;
  const sizes = [...new Set(estimates.map((e) => e.perGroup))].sort((a, b) => a - b);
  const lo = sizes[0];
  const hi = sizes[sizes.length - 1];
  const x = (n: number) => left + (hi === lo ? 0.5 : (n - lo) / (hi - lo)) * (width - left - right);
  const y = (p: number) => top + (1 - p) * (height - top - bottom);
  const styles: Record<string, [string, string]> = {
    components: ["#1b4f72", ""],
    "max-t": ["#b9770e", "7 4"],
    fdr: ["#6c3483", "2 3"],
    uncorrected: ["#7f8c8d", "1 5"],
  };
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="sans-serif" font-size="12">`,
    `<rect width="100%" height="100%" fill="white"/>`,
    `<line x1="${left}" y1="${y(0)}" x2="${width - right}" y2="${y(0)}" stroke="#333"/>`,
    `<line x1="${left}" y1="${y(0)}" x2="${left}" y2="${y(1)}" stroke="#333"/>`,
    `<line x1="${left}" y1="${y(target)}" x2="${width - right}" y2="${y(target)}" stroke="#999" stroke-dasharray="3 3"/>`,
    `<text x="${width - right + 4}" y="${y(target) + 4}" fill="#555">target ${Math.round(target * 100)}%</text>`,
  ];
  for (const v of [0, 0.25, 0.5, 0.75, 1]) parts.push(`<text x="${left - 6}" y="${y(v) + 4}" text-anchor="end">${v}</text>`);
  for (const n of sizes) parts.push(`<text x="${x(n)}" y="${y(0) + 16}" text-anchor="middle">${n}</text>`);
  parts.push(`<text x="${(left + width - right) / 2}" y="${height - 8}" text-anchor="middle">participants per group</text>`);
  parts.push(`<text transform="translate(14 ${(top + height - bottom) / 2}) rotate(-90)" text-anchor="middle">power</text>`);
  Object.entries(styles).forEach(([method, [colour, dash]], i) => {
    const points = sizes.map((n) => {
      const e = estimates.find((v) => v.perGroup === n && v.method === method)!;
      return `${x(n).toFixed(1)},${y(e.power).toFixed(1)}`;
    });
    parts.push(`<polyline fill="none" stroke="${colour}" stroke-width="2" stroke-dasharray="${dash}" points="${points.join(" ")}"/>`);
    const ly = top + 20 + i * 18;
    parts.push(`<line x1="${width - right + 10}" y1="${ly}" x2="${width - right + 34}" y2="${ly}" stroke="${colour}" stroke-width="2" stroke-dasharray="${dash}"/>`);
    parts.push(`<text x="${width - right + 40}" y="${ly + 4}">${method}</text>`);
  });
  parts.push("</svg>\n");
  return parts.join("\n");
}
