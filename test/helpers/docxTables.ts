// A .docx package read the way a test opens it: unzipped with fflate, word/document.xml checked
// well-formed with fast-xml-parser, its body walked as paragraphs and tables. Shared by the
// tests that compare tables.docx cells with their TSV twins.
import { XMLValidator } from "fast-xml-parser";
import { unzipSync } from "fflate";
import { expect } from "vitest";

/** Each table of document.xml: the paragraph text before it (the caption), its rows of cell texts, the paragraphs after it up to the next caption. */
export type DocxTables = { caption: string; rows: string[][]; after: string[] }[];

const decode = (xml: string) =>
  xml.replace(/&(lt|gt|amp|quot|apos|#(\d+)|#x([0-9a-fA-F]+));/g, (_, name: string, dec?: string, hex?: string) =>
    dec ? String.fromCodePoint(Number(dec)) : hex ? String.fromCodePoint(parseInt(hex, 16)) : ({ lt: "<", gt: ">", amp: "&", quot: '"', apos: "'" } as Record<string, string>)[name],
  );
const runText = (xml: string) => [...xml.matchAll(/<w:t(?:\s[^>]*)?>([^<]*)<\/w:t>/g)].map((m) => decode(m[1])).join("");

/** The tables of a .docx package as this test reads them: unzip, check the XML, walk the body's paragraphs and tables. */
export function readTables(docx: Uint8Array): DocxTables {
  const entries = unzipSync(docx);
  expect(Object.keys(entries)).toEqual(expect.arrayContaining(["[Content_Types].xml", "_rels/.rels", "word/document.xml", "word/styles.xml"]));
  const xml = new TextDecoder().decode(entries["word/document.xml"]);
  expect(XMLValidator.validate(xml)).toBe(true);
  const body = xml.slice(xml.indexOf("<w:body>") + 8, xml.indexOf("</w:body>"));
  // Top-level blocks in order: paragraphs and tables (the writer never nests tables).
  const blocks = [...body.matchAll(/<w:p[ >][\s\S]*?<\/w:p>|<w:tbl>[\s\S]*?<\/w:tbl>/g)].map((m) => m[0]);
  const tables: DocxTables = [];
  blocks.forEach((block, k) => {
    if (!block.startsWith("<w:tbl>")) return;
    const rows = [...block.matchAll(/<w:tr[ >][\s\S]*?<\/w:tr>/g)].map((tr) => [...tr[0].matchAll(/<w:tc>[\s\S]*?<\/w:tc>/g)].map((tc) => runText(tc[0])));
    const after: string[] = [];
    for (const next of blocks.slice(k + 1)) {
      if (next.startsWith("<w:tbl>") || /^Table \d+\. /.test(runText(next))) break;
      after.push(runText(next));
    }
    tables.push({ caption: runText(blocks[k - 1]), rows, after });
  });
  return tables;
}

/** The printed number is the value rounded to the digits printed ("< 0.001": below 0.001; "—": no value). */
export function expectRounded(printed: string, value: string, label: string): void {
  if (printed === "—") {
    expect(value === "" || !Number.isFinite(Number(value)), `${label}: '—' for ${value}`).toBe(true);
    return;
  }
  const v = Number(value);
  if (printed === "< 0.001") {
    expect(v, label).toBeLessThan(0.001);
    return;
  }
  const match = printed.match(/^-?\d+(?:\.(\d+))?(?:e(-?\d+))?$/);
  expect(match, `${label}: '${printed}' is a number`).not.toBeNull();
  const decimals = match![1]?.length ?? 0;
  const exponent = Number(match![2] ?? 0);
  const halfUnit = 0.5 * 10 ** (exponent - decimals);
  // Whole numbers of three or more digits may be rounded significant figures (e.g. a mass of 1234.5 printed 1235).
  expect(Math.abs(v - Number(printed)), `${label}: '${printed}' vs ${value}`).toBeLessThanOrEqual(halfUnit * (1 + 1e-9) + 1e-12);
}

/** Numbers printed in a cell, in order ("0.431 [0.301, 0.561]" → three). */
export const numbers = (cell: string) => (cell === "—" ? ["—"] : [...cell.matchAll(/< 0\.001|-?\d+(?:\.\d+)?(?:e-?\d+)?/g)].map((m) => m[0]));
