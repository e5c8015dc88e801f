import { createRequire } from "node:module";
import { dirname, join } from "node:path";
import { Resvg, renderAsync, type ResvgRenderOptions } from "@resvg/resvg-js";
import { WIDTH_MM, type PrintWidth } from "./printSize.js";

/**
 * SVG to PNG at 300 dots per inch, with resvg (a complete SVG renderer in a
 * prebuilt native module from npm; nothing is downloaded at install or run
 * time). Text is set in DejaVu Sans from the dejavu-fonts-ttf package and the
 * machine's own fonts are never consulted, so the same SVG gives the same PNG
 * bytes on every machine.
 */
export const PNG_DPI = 300;

let fontFiles: string[] | undefined;

function dejaVuFiles(): string[] {
  if (!fontFiles) {
    const require = createRequire(import.meta.url);
    const folder = join(dirname(require.resolve("dejavu-fonts-ttf/package.json")), "ttf");
    fontFiles = ["DejaVuSans.ttf", "DejaVuSans-Bold.ttf", "DejaVuSans-Oblique.ttf"].map((file) => join(folder, file));
  }
  return fontFiles;
}

function renderOptions(width: PrintWidth): ResvgRenderOptions {
  return {
    fitTo: { mode: "width", value: pngPixels(width) },
    background: "#ffffff",
    font: { loadSystemFonts: false, fontFiles: dejaVuFiles(), defaultFontFamily: "DejaVu Sans", sansSerifFamily: "DejaVu Sans" },
  };
}

/** The PNG of a print figure drawn at `width`, at PNG_DPI (2,126 pixels across two columns, 1,004 across one). */
export function rasterise(svg: string, width: PrintWidth): Uint8Array {
  return new Resvg(svg, renderOptions(width)).render().asPng();
}

/** The same PNG, drawn on Node's thread pool: several figures render at once, beside the main thread's work. */
export async function rasteriseInBackground(svg: string, width: PrintWidth): Promise<Uint8Array> {
  return (await renderAsync(svg, renderOptions(width))).asPng();
}

/** The PNG's width in pixels at a print width. */
export function pngPixels(width: PrintWidth): number {
  return Math.round((WIDTH_MM[width] / 25.4) * PNG_DPI);
}
