import { AlignmentType, BorderStyle, Document, Packer, PageOrientation, Paragraph, Table, TableCell, TableRow, TextRun, WidthType, type IBorderOptions } from "docx";
import { unzipSync, zipSync } from "fflate";
import type { ReportTable } from "./reportTable.js";

/** Tables wider than this many columns turn the page to landscape (the whole document, so tables keep one orientation). */
const PORTRAIT_COLUMNS = 7;
/** Font sizes in half-points: body 10 pt, table cells 9 pt, notes 8 pt. */
const BODY_SIZE = 20;
const CELL_SIZE = 18;
const NOTE_SIZE = 16;
/** A level row's indent, in twentieths of a point (12 pt). */
const LEVEL_INDENT_TWIPS = 240;
/**
 * The date stamped on the document and on every file of its zip package, so
 * that the same results give the same bytes (the report is rewritten by
 * `plexus report` and recorded by SHA-256). Zip times are local, so this is
 * built from local components: the same fields in every time zone.
 */
const FIXED_ZIP_TIME = new Date(1980, 0, 1, 0, 0, 0);
const FIXED_W3C_TIME = "1980-01-01T00:00:00Z";

const RULE: IBorderOptions = { style: BorderStyle.SINGLE, size: 8, color: "000000" };
const THIN_RULE: IBorderOptions = { style: BorderStyle.SINGLE, size: 4, color: "000000" };
const NO_RULE: IBorderOptions = { style: BorderStyle.NONE, size: 0, color: "FFFFFF" };

/**
 * tables.docx: the print tables of tables.md as a Word document (Office Open
 * XML, written with the `docx` library): each table under its caption
 * ("Table n. title"), in the booktabs style of tables.tex (rules above and
 * below the table and under the header, no vertical rules), numbers aligned
 * right, levels of a categorical variable indented, notes in small type below.
 * The same ReportTable structures feed tables.md and tables.tex, so numbers
 * and wording agree; any writer of numbered ReportTables (a results folder's
 * report, `plexus strength`) can call it. The bytes depend on the tables and
 * the version alone (fixed timestamps). `twins` names the full-precision
 * files in the opening sentence.
 */
export async function tablesDocx(tables: readonly { number: number; table: ReportTable }[], version: string, twins = "tables/*.tsv hold the same tables"): Promise<Uint8Array> {
  const landscape = tables.some(({ table }) => table.columns.length > PORTRAIT_COLUMNS);
  const children: (Paragraph | Table)[] = [
    new Paragraph({ children: [new TextRun({ text: "Tables", bold: true, size: 28 })], spacing: { after: 120 } }),
    paragraph(`Written by plexus ${version} from this results folder. Numbers are rounded for print; ${twins} at full precision.`, BODY_SIZE),
  ];
  for (const { table, number } of tables) children.push(...wordTable(table, number));
  const document = new Document({
    creator: "plexus",
    lastModifiedBy: "plexus",
    title: "Tables",
    description: `Print tables written by plexus ${version}`,
    styles: { default: { document: { run: { font: "Calibri", size: BODY_SIZE } } } },
    sections: [
      {
        properties: landscape ? { page: { size: { orientation: PageOrientation.LANDSCAPE } } } : {},
        children,
      },
    ],
  });
  return fixedTimes(await Packer.toBuffer(document));
}

function paragraph(text: string, size: number, options: { bold?: boolean; after?: number; before?: number; keepNext?: boolean } = {}): Paragraph {
  return new Paragraph({
    children: [new TextRun({ text, size, bold: options.bold })],
    spacing: { before: options.before ?? 0, after: options.after ?? 120 },
    keepNext: options.keepNext,
  });
}

/** A caption paragraph, the table, and its notes. */
function wordTable(table: ReportTable, number: number): (Paragraph | Table)[] {
  const caption = new Paragraph({
    children: [new TextRun({ text: `Table ${number}. `, bold: true }), new TextRun({ text: table.title })],
    spacing: { before: 360, after: 120 },
    keepNext: true,
  });
  const cell = (text: string, k: number, options: { header?: boolean; indent?: boolean; last?: boolean }) =>
    new TableCell({
      children: [
        new Paragraph({
          alignment: table.columns[k]?.align === "right" ? AlignmentType.RIGHT : AlignmentType.LEFT,
          indent: options.indent ? { left: LEVEL_INDENT_TWIPS } : undefined,
          children: [new TextRun({ text, size: CELL_SIZE, bold: options.header })],
        }),
      ],
      borders: {
        top: options.header ? RULE : NO_RULE,
        bottom: options.header ? THIN_RULE : options.last ? RULE : NO_RULE,
        left: NO_RULE,
        right: NO_RULE,
      },
      margins: { top: 20, bottom: 20, left: 80, right: 80 },
    });
  const header = new TableRow({ tableHeader: true, children: table.columns.map((c, k) => cell(c.header, k, { header: true })) });
  const body = table.rows.map(
    (row, r) =>
      new TableRow({
        cantSplit: true,
        children: row.cells.map((text, k) => cell(text, k, { indent: k === 0 && row.indent === true, last: r === table.rows.length - 1 })),
      }),
  );
  const word = new Table({
    rows: [header, ...body],
    width: { size: 100, type: WidthType.PERCENTAGE },
    borders: { top: NO_RULE, bottom: NO_RULE, left: NO_RULE, right: NO_RULE, insideHorizontal: NO_RULE, insideVertical: NO_RULE },
  });
  const notes = table.notes.map((note, k) => paragraph(note, NOTE_SIZE, { before: k === 0 ? 80 : 0, after: 60 }));
  return [caption, word, ...notes];
}

/**
 * The package with its clock readings replaced: the document's created and
 * modified dates and each zip entry's time. The entries keep their order and
 * content; fflate (which docx itself zips with) writes them again.
 */
function fixedTimes(packed: Uint8Array): Uint8Array {
  const entries = unzipSync(packed);
  const core = entries["docProps/core.xml"];
  if (core) {
    const text = new TextDecoder().decode(core).replace(
      /(<dcterms:(created|modified)[^>]*>)[^<]*(<\/dcterms:\2>)/g,
      (_, open: string, __: string, close: string) => `${open}${FIXED_W3C_TIME}${close}`,
    );
    entries["docProps/core.xml"] = new TextEncoder().encode(text);
  }
  return zipSync(entries, { mtime: FIXED_ZIP_TIME });
}
