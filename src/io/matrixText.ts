import { Buffer, isAscii } from "node:buffer";
import { InputError } from "../errors.js";
import { cellKind } from "./numericCells.js";
import { isNumberCell, readCell } from "./delimitedCells.js";
import { labelledMatrix, type MatrixLabels } from "./matrixTextLabels.js";
import { detectMatrixLayout, headerCountError, headerFits, shortCell, type MatrixTextLayout } from "./matrixTextLayout.js";
import { systemReason } from "./readInputFile.js";

/**
 * One square matrix as text: N lines of N numbers, separated by a tab, a comma
 * (spaces around it allowed) or runs of spaces and tabs. The delimiter is
 * chosen per file: commas if the first non-blank line has one (outside double
 * quotes), else whitespace. A header row of region labels and a first column of
 * labels are recognised by the rule of matrixTextLayout.ts; the labels are
 * checked by matrixTextLabels.ts. A UTF-8 byte-order mark, CRLF line ends and
 * blank lines are tolerated.
 *
 * Two readers share these rules. `parseMatrixText` walks a string with
 * charCodeAt and never splits it; it is the reference, and every error about
 * the content is its own. `parseMatrixBytes` walks a file's bytes (ASCII, after an
 * optional byte-order mark) without decoding them to a string, writing into
 * arrays it may reuse from the previous file; at anything unusual (a bad cell, a
 * ragged row, non-ASCII bytes) it hands the decoded text to `parseMatrixText`,
 * so its results and its errors are that function's.
 *
 * Every value equals Number(cell). A cell in plain decimal syntax ([+-] digits
 * [. digits] [e [+-] digits]) is the integer m of its digits times 10^e:
 * - m < 2^53 and |e| ≤ 22: m and 10^|e| are exact doubles, so one multiplication
 *   or division, which IEEE 754 rounds correctly, gives the nearest double
 *   (Clinger 1990, "How to read floating point numbers accurately", PLDI '90,
 *   ACM SIGPLAN Notices 25(6):92-101, the fast path);
 * - m of at most 19 significant digits and −21 ≤ e ≤ 0: `nearestDecimal` takes
 *   the quotient of the nearest double to m by 10^−e and corrects it, by whole
 *   units in the last place, using the remainder m − y·10^−e computed exactly
 *   with Dekker's error-free product (Dekker 1971, "A floating-point technique
 *   for extending the available precision", Numerische Mathematik 18:224-242),
 *   as Clinger's Algorithm R corrects an approximation with exact arithmetic;
 * - any other cell in decimal syntax goes to Number().
 */
export interface MatrixTextOptions {
  /**
   * Accept NaN and ±Inf on the diagonal (written nan, inf, infinity in any case,
   * with an optional sign), e.g. a correlation matrix after atanh. Off-diagonal
   * non-finite cells are rejected either way.
   */
  allowNonFiniteDiagonal?: boolean;
  /**
   * `edges.missing: drop`: a cell written nan (any case) anywhere is a missing
   * value (NaN). NA (a region label in a header row), an empty cell and ±Inf
   * off the diagonal stay errors.
   */
  allowMissing?: boolean;
}

export interface ParsedMatrixText {
  /** N, the number of rows and of columns. */
  size: number;
  /** Row-major cells, length N × N. */
  values: Float64Array;
  /** 1-based file line of each matrix row, for locating later checks. */
  rowLines: number[];
  /** The region labels of a file with a header row or a label column (absent for a plain matrix). */
  labels?: MatrixLabels;
}

const TAB = 9;
const LINE_FEED = 10;
const CR = 13;
const SPACE = 32;
const PLUS = 43;
const COMMA = 44;
const MINUS = 45;
const DOT = 46;
const ZERO = 48;
const NINE = 57;
const QUOTE = 34;
const UPPER_E = 69;
const LOWER_E = 101;
/** A byte OR this is the lower-case letter for an ASCII letter (and changes no digit, sign, dot or separator into e). */
const ASCII_LOWER_CASE_BIT = 0x20;

/** 10^0 … 10^22: every one is exactly representable as a double. */
const EXACT_POWERS_OF_TEN = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19,
  1e20, 1e21, 1e22,
];
const TWO_TO_53 = 9007199254740992;
/** What parseDecimalSpan returns for text not in decimal syntax (a decimal never parses to NaN). */
const NOT_DECIMAL = Number.NaN;
/** Significant digits `nearestDecimal` takes in its high part (10^15 < 2^53), and in all (m < 10^19 < 2^64). */
const HIGH_DIGITS = 15;
const MAX_SIGNIFICANT_DIGITS = 19;
const MAX_LOW_DIGITS = MAX_SIGNIFICANT_DIGITS - HIGH_DIGITS;
/** The high part holds 15 significant digits once it reaches 10^14. */
const FULL_HIGH = 1e14;
/** Largest −e for `nearestDecimal`; its exactness argument needs 5^−e < 2^49. */
const MAX_QUOTIENT_POWER = 21;
/** What `nearestDecimal` returns when it leaves the cell to Number() (a magnitude is never negative). */
const UNDECIDED = -1;
/** Values in the first row before N is known, when no array is reused. */
const FIRST_ROW_CAPACITY = 64;

export function parseMatrixText(text: string, file: string, options: MatrixTextOptions = {}): ParsedMatrixText {
  const allowNonFiniteDiagonal = options.allowNonFiniteDiagonal === true;
  const allowMissing = options.allowMissing === true;
  const end = text.length;
  const layout = detectMatrixLayout(text, text.charCodeAt(0) === 0xfeff ? 1 : 0, file);
  const commaSeparated = layout.commaSeparated;
  // File column of matrix column 0, less one: the label column comes first.
  const columnShift = layout.labelColumn ? 1 : 0;
  const belowHeader = layout.header ? ` (below the header row on line ${layout.header.line})` : "";
  const rowLabels: string[] = [];

  let pos = layout.bodyStart;
  let line = layout.linesBefore;
  let size = -1;
  let row = 0;
  let values = new Float64Array(0);
  const firstRow: number[] = [];
  const rowLines: number[] = [];

  while (pos < end) {
    line++;
    let lineEnd = text.indexOf("\n", pos);
    if (lineEnd < 0) lineEnd = end;
    let stop = lineEnd;
    if (stop > pos && text.charCodeAt(stop - 1) === CR) stop--;
    let p = skipWhitespace(text, pos, stop);
    if (p === stop) {
      pos = lineEnd + 1;
      continue;
    }
    if (size >= 0 && row >= size) {
      throw new InputError(
        `matrix is not square: it has ${size} columns but more than ${size} rows (row ${row + 1} is on this line)${belowHeader}`,
        { file, line },
      );
    }
    if (layout.labelColumn) p = readRowLabel(text, p, stop, layout, row, rowLabels, { file, line });

    let column = 0;
    for (;;) {
      if (size >= 0 && column >= size) {
        throw new InputError(
          `matrix is not square: row ${row + 1} has more than ${size} values${columnShift ? " after its label" : ""}`,
          { file, line, column: column + 1 + columnShift },
          row === 1 && !layout.header && !layout.labelColumn ? NUMBER_LABELS_HINT : undefined,
        );
      }
      const start = p;
      let value = scanDecimal(text, start, stop);
      p = scanEnd;
      if (p < stop) {
        const c = text.charCodeAt(p);
        if (!(c === SPACE || c === TAB || (commaSeparated && c === COMMA))) value = NOT_DECIMAL;
      }
      if (value !== value) {
        p = tokenEnd(text, start, stop, commaSeparated);
        if (p === start) {
          throw new InputError(`empty cell in column ${column + 1}`, { file, line, column: column + 1 + columnShift });
        }
        const word = nonFiniteWord(text, start, p);
        if (word === "") {
          throw new InputError(
            `cell '${shortCell(text.slice(start, p))}' at row ${row + 1}, column ${column + 1} is not a number` +
              (column === 0 && !layout.labelColumn ? noLabelColumn(layout) : ""),
            { file, line, column: column + 1 + columnShift },
          );
        }
        value = Number(word);
      }
      // While the first row is read `row` is 0, so the diagonal test holds before N is known.
      if (!Number.isFinite(value) && !(allowNonFiniteDiagonal && column === row) && !(allowMissing && value !== value)) {
        throw new InputError(
          `cell '${shortCell(text.slice(start, p))}' at row ${row + 1}, column ${column + 1} is not finite` +
            (allowNonFiniteDiagonal ? " (only the diagonal may be NaN or infinite)" : ""),
          { file, line, column: column + 1 + columnShift },
        );
      }
      if (size < 0) firstRow.push(value);
      else values[row * size + column] = value;
      column++;

      p = skipWhitespace(text, p, stop);
      if (p === stop) break;
      if (commaSeparated) {
        if (text.charCodeAt(p) !== COMMA) {
          throw new InputError(`expected a comma after column ${column}`, { file, line, column: column + 1 + columnShift });
        }
        p = skipWhitespace(text, p + 1, stop);
        if (p === stop) {
          throw new InputError(`empty cell in column ${column + 1} (comma at the end of the line)`, {
            file,
            line,
            column: column + 1 + columnShift,
          });
        }
      }
    }

    if (size < 0) {
      size = column;
      if (layout.header && !headerFits(layout, size)) throw headerCountError(layout, size, file);
      values = new Float64Array(size * size);
      values.set(firstRow);
    } else if (column !== size) {
      throw new InputError(`matrix is not square: row ${row + 1} has ${column} values${columnShift ? " after its label" : ""}, expected ${size}`, {
        file,
        line,
        column: column + 1 + columnShift,
      });
    }
    rowLines.push(line);
    row++;
    pos = lineEnd + 1;
  }

  if (size < 0) {
    if (layout.header) {
      throw new InputError(`the header row is followed by no rows of numbers: expected N rows of N numbers below it`, { file, line: layout.header.line });
    }
    throw new InputError("empty matrix file: expected N lines of N numbers", { file, line: 1 });
  }
  if (row !== size) {
    throw new InputError(`matrix is not square: ${row} rows of ${size} values${belowHeader}`, {
      file,
      line: rowLines[rowLines.length - 1],
    });
  }
  return labelledMatrix({ size, values, rowLines }, layout, rowLabels, file);
}

/** For a second row longer than the first: labels that are numbers are read as numbers unless the rule can tell. */
const NUMBER_LABELS_HINT =
  "if the first line and the first column are region labels that are numbers, put them in double quotes, " +
  "or, in a comma-separated file, leave the first line's first cell empty (a corner cell above the label column)";

/**
 * Reads the label that begins a row of a file with a label column and returns
 * where its numbers begin. An empty label, a number where the rule expects a
 * label (see matrixTextLayout.ts) and a label with no numbers after it are
 * InputErrors that say why a label was expected.
 */
function readRowLabel(
  text: string,
  p: number,
  stop: number,
  layout: MatrixTextLayout,
  row: number,
  labels: string[],
  where: { file: string; line: number },
): number {
  const cell = readCell(text, p, stop, layout.labelSeparator, { ...where, column: 1 });
  if (!cell.quoted && cell.text === "") {
    throw new InputError(`row ${row + 1} has an empty first cell where its label is expected${whyLabels(layout)}`, { ...where, column: 1 });
  }
  if (!layout.emptyCorner && isNumberCell(cell)) {
    throw new InputError(
      `row ${row + 1} begins with '${shortCell(cell.text)}', a number, where its label is expected${whyLabels(layout)}`,
      { ...where, column: 1 },
      "begin every row with its label (in double quotes if it is a number), or give no label column at all",
    );
  }
  labels.push(cell.text);
  let q = cell.end;
  if (layout.labelSeparator !== "whitespace" && q < stop) q++;
  q = skipWhitespace(text, q, stop);
  if (q === stop) {
    throw new InputError(
      `row ${row + 1} has its label '${shortCell(cell.text)}' but no numbers after it` +
        (layout.labelSeparator === "tab" ? " (in this file a label ends at a tab, since the first line has one)" : ""),
      { ...where, column: 2 },
    );
  }
  return q;
}

/** Why the first column holds labels, for messages. */
function whyLabels(layout: MatrixTextLayout): string {
  const reason = layout.labelColumnReason;
  if (reason) return `: the first column holds region labels because line ${reason.line} begins with '${shortCell(reason.label)}', which is not a number`;
  return `: the first column holds region labels because the header row's first cell (line ${layout.header!.line}) is empty`;
}

/** Why a text cell in the first column is no label, for messages. */
function noLabelColumn(layout: MatrixTextLayout): string {
  const line = layout.plainFirstRowLine;
  return line === undefined
    ? ""
    : `; the first row (line ${line}) begins with a number, so the file has no label column: to label the rows, begin every row with its label, the first included`;
}

/**
 * The matrix in a file's bytes, as `parseMatrixText` reads the file's text
 * (decoded as UTF-8, as readFileSync(path, "utf8") does): the same result or the
 * same InputError. ASCII bytes after an optional UTF-8 byte-order mark are read
 * as they are; anything else is decoded and given to `parseMatrixText`.
 *
 * With `reuse` (the previous result, which the caller no longer needs) the
 * result may be written into its arrays when the size is the same, and they may
 * be overwritten even when this call ends in an error.
 */
export function parseMatrixBytes(
  bytes: Uint8Array,
  file: string,
  options: MatrixTextOptions = {},
  reuse?: ParsedMatrixText,
): ParsedMatrixText {
  const start = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  const ascii = isAscii(start === 0 ? bytes : bytes.subarray(start));
  if (ascii) {
    const layout = asciiLayout(bytes, start, file);
    const labels = layout.labelColumn ? asciiLabelling(layout) : undefined;
    const matrix = scanAsciiMatrix(bytes, layout, labels, options.allowNonFiniteDiagonal === true, reuse);
    if (matrix) return labelledMatrix(matrix, layout, labels?.names ?? [], file);
  }
  return parseMatrixText(decodeUtf8(bytes, file), file, options);
}

/** How the byte reader takes each row's label: the byte that ends it (SPACE: a space or a tab), whether numbers may be labels, and the labels read. */
interface AsciiLabelling {
  separator: number;
  numbersAllowed: boolean;
  names: string[];
}

function asciiLabelling(layout: MatrixTextLayout): AsciiLabelling {
  const separator = layout.labelSeparator === "comma" ? COMMA : layout.labelSeparator === "tab" ? TAB : SPACE;
  return { separator, numbersAllowed: layout.emptyCorner, names: [] };
}

/**
 * The layout of ASCII bytes (from `begin`), as detectMatrixLayout gives it for
 * their text. A first line of nothing but digits, signs, dots, exponent
 * letters, spaces, tabs and commas (and no comma first) is taken as plain
 * without decoding it: if its cells are all numbers that is what the rule
 * says, and if one is not the byte reader stops there and parseMatrixText
 * applies the rule. Any other first line is decoded with the next one and
 * given to detectMatrixLayout.
 */
function asciiLayout(bytes: Uint8Array, begin: number, file: string): MatrixTextLayout {
  const first = contentLineInBytes(bytes, begin);
  if (first === undefined) return { commaSeparated: false, labelSeparator: "whitespace", labelColumn: false, emptyCorner: false, bodyStart: begin, linesBefore: 0 };
  let plain = true;
  let comma = false;
  let leading = true;
  for (let p = first.start; p < first.stop; p++) {
    const c = bytes[p];
    if (c === SPACE || c === TAB) continue;
    if (c === COMMA) {
      if (leading) plain = false;
      comma = true;
    } else if (!((c >= ZERO && c <= NINE) || c === PLUS || c === MINUS || c === DOT || c === LOWER_E || c === UPPER_E)) {
      plain = false;
    }
    leading = false;
    if (!plain) break;
  }
  if (plain) return { commaSeparated: comma, labelSeparator: comma ? "comma" : "whitespace", labelColumn: false, emptyCorner: false, bodyStart: begin, linesBefore: 0 };
  const second = contentLineInBytes(bytes, first.next);
  const prefixEnd = second === undefined ? bytes.length : Math.min(second.next, bytes.length);
  let prefix: string;
  try {
    prefix = latin1(bytes, begin, prefixEnd);
  } catch (error) {
    throw new InputError(`cannot read ${file}: ${systemReason(error)}`, { file }); // a first line longer than a string can be
  }
  const layout = detectMatrixLayout(prefix, 0, file);
  return { ...layout, bodyStart: layout.bodyStart + begin };
}

/** The first line from `pos` on with a byte other than a space or a tab (before a final CR): [start, stop), and `next` past its line feed. */
function contentLineInBytes(bytes: Uint8Array, pos: number): { start: number; stop: number; next: number } | undefined {
  const end = bytes.length;
  while (pos < end) {
    let lineEnd = bytes.indexOf(LINE_FEED, pos);
    if (lineEnd < 0) lineEnd = end;
    let stop = lineEnd;
    if (stop > pos && bytes[stop - 1] === CR) stop--;
    for (let p = pos; p < stop; p++) {
      const c = bytes[p];
      if (c !== SPACE && c !== TAB) return { start: pos, stop, next: lineEnd + 1 };
    }
    pos = lineEnd + 1;
  }
  return undefined;
}

/**
 * The label that begins a row, read by the byte reader into `labels.names`;
 * returns where the row's numbers begin, or −1 where readRowLabel might raise
 * an error or read the label otherwise (a quoted label, an empty one, a number
 * where a label must be text, no numbers after it): the file is then left to
 * parseMatrixText.
 */
function scanAsciiLabel(bytes: Uint8Array, p: number, stop: number, labels: AsciiLabelling): number {
  if (bytes[p] === QUOTE) return -1;
  const separator = labels.separator;
  let q = p;
  let c = 0;
  if (separator === SPACE) while (q < stop && (c = bytes[q]) !== SPACE && c !== TAB) q++;
  else while (q < stop && bytes[q] !== separator) q++;
  let labelEnd = q;
  while (labelEnd > p && ((c = bytes[labelEnd - 1]) === SPACE || c === TAB)) labelEnd--;
  if (labelEnd === p) return -1;
  const label = latin1(bytes, p, labelEnd);
  if (!labels.numbersAllowed && cellKind(label) !== "text") return -1;
  labels.names.push(label);
  if (separator !== SPACE) {
    if (q === stop) return -1;
    q++;
  }
  while (q < stop && ((c = bytes[q]) === SPACE || c === TAB)) q++;
  return q === stop ? -1 : q;
}

/**
 * The byte reader's work: the matrix in the ASCII bytes laid out as `layout`
 * says, or undefined where `parseMatrixText` might raise an error (it is then
 * left to that function). Each cell is scanned inline, without a call, into
 * the parts of m that scanDecimal makes (the values are its values). The digit
 * loops test no bound: the byte at `stop` is CR or LF, or lies past the end,
 * where reading gives undefined, which the NaN-safe digit test rejects.
 */
function scanAsciiMatrix(
  bytes: Uint8Array,
  layout: MatrixTextLayout,
  labels: AsciiLabelling | undefined,
  allowNonFiniteDiagonal: boolean,
  reuse: ParsedMatrixText | undefined,
): ParsedMatrixText | undefined {
  const end = bytes.length;
  const commaSeparated = layout.commaSeparated;
  const headerCells = layout.header ? layout.header.cells.length : -1;
  // The first row goes into `values` from 0 on before N is known; it is then in place.
  let values = reuse !== undefined && reuse.values.length > 0 ? reuse.values : new Float64Array(FIRST_ROW_CAPACITY);
  const rowLines = reuse !== undefined ? reuse.rowLines : [];

  let line = layout.linesBefore;
  let size = -1;
  let row = 0;
  let rowStart = 0;
  let pos = layout.bodyStart;
  let c = 0;
  while (pos < end) {
    line++;
    let lineEnd = bytes.indexOf(LINE_FEED, pos);
    if (lineEnd < 0) lineEnd = end;
    let stop = lineEnd;
    if (stop > pos && bytes[stop - 1] === CR) stop--;
    let p = pos;
    while (p < stop && ((c = bytes[p]) === SPACE || c === TAB)) p++;
    pos = lineEnd + 1;
    if (p === stop) continue;
    if (row === size) return undefined; // more rows than columns
    if (labels !== undefined && (p = scanAsciiLabel(bytes, p, stop, labels)) < 0) return undefined;

    let column = 0;
    for (;;) {
      if (column === size) return undefined; // a long row
      const cellStart = p;
      c = bytes[p];
      const negative = c === MINUS;
      if (negative || c === PLUS) p++;
      // m = high · 10^lowDigits + low: digits go into `high` until it holds 15 significant
      // digits (high ≥ 10^14; leading zeros leave it 0), the rest into `low`.
      const digitsStart = p;
      let high = 0;
      let low = 0;
      for (; ; p++) {
        // Written so that NaN (a read past the end) ends the loop: not `digit < 0 || digit > 9`.
        const digit = bytes[p] - ZERO;
        if (!(digit >= 0 && digit <= 9) || high >= FULL_HIGH) break;
        high = high * 10 + digit;
      }
      let lowStart = p;
      for (; ; p++) {
        const digit = bytes[p] - ZERO;
        if (!(digit >= 0 && digit <= 9)) break;
        low = low * 10 + digit;
      }
      let lowDigits = p - lowStart;
      let digitCount = p - digitsStart;
      let exponent = 0;
      if (p < stop && bytes[p] === DOT) {
        const fractionStart = ++p;
        if (lowDigits === 0) {
          for (; ; p++) {
            const digit = bytes[p] - ZERO;
            if (!(digit >= 0 && digit <= 9) || high >= FULL_HIGH) break;
            high = high * 10 + digit;
          }
        }
        lowStart = p;
        for (; ; p++) {
          const digit = bytes[p] - ZERO;
          if (!(digit >= 0 && digit <= 9)) break;
          low = low * 10 + digit;
        }
        lowDigits += p - lowStart;
        exponent = fractionStart - p;
        digitCount += p - fractionStart;
      }
      if (p < stop && (bytes[p] | ASCII_LOWER_CASE_BIT) === LOWER_E) {
        let q = p + 1;
        const exponentNegative = q < stop && bytes[q] === MINUS;
        if (q < stop && (exponentNegative || bytes[q] === PLUS)) q++;
        const exponentDigitsStart = q;
        let explicit = 0;
        for (; q < stop; q++) {
          const digit = bytes[q] - ZERO;
          if (digit < 0 || digit > 9) break;
          if (explicit < 100000) explicit = explicit * 10 + digit;
        }
        // Without exponent digits the "e" is not part of the number (and the cell is then not one).
        if (q > exponentDigitsStart) {
          p = q;
          exponent += exponentNegative ? -explicit : explicit;
        }
      }

      let value: number;
      if (digitCount > 0 && (p === stop || (c = bytes[p]) === SPACE || c === TAB || (commaSeparated && c === COMMA))) {
        if (lowDigits > MAX_LOW_DIGITS) {
          value = Number(latin1(bytes, cellStart, p));
        } else {
          // As in scanDecimal: the fast path of Clinger (1990) while m < 2^53, else nearestDecimal.
          const mantissa = lowDigits === 0 ? high : high * EXACT_POWERS_OF_TEN[lowDigits] + low;
          if (mantissa < TWO_TO_53 && exponent >= -22 && exponent <= 22) {
            value =
              exponent >= 0 ? mantissa * EXACT_POWERS_OF_TEN[exponent] : mantissa / EXACT_POWERS_OF_TEN[-exponent];
          } else {
            value = mantissa === 0 ? 0 : nearestDecimal(high, low, lowDigits, exponent);
            if (value === UNDECIDED) value = Number(latin1(bytes, cellStart + (negative ? 1 : 0), p));
          }
          if (negative) value = -value;
        }
        if (!Number.isFinite(value) && !(allowNonFiniteDiagonal && column === row)) return undefined;
      } else {
        // NaN or ±Inf on the diagonal, when allowed; anything else is left to parseMatrixText.
        if (!(allowNonFiniteDiagonal && column === row)) return undefined;
        p = cellStart;
        while (p < stop && (c = bytes[p]) !== SPACE && c !== TAB && !(commaSeparated && c === COMMA)) p++;
        value = nonFiniteWordValue(bytes, cellStart, p);
        if (value === 0) return undefined;
      }

      if (size < 0) {
        if (column === values.length) values = grown(values);
        values[column] = value;
      } else {
        values[rowStart + column] = value;
      }
      column++;

      while (p < stop && ((c = bytes[p]) === SPACE || c === TAB)) p++;
      if (p === stop) break;
      if (commaSeparated) {
        if (bytes[p] !== COMMA) return undefined;
        p++;
        while (p < stop && ((c = bytes[p]) === SPACE || c === TAB)) p++;
        if (p === stop) return undefined; // a comma at the end of the line
      }
    }

    if (size < 0) {
      size = column;
      if (headerCells >= 0 && !(headerCells === size || (labels !== undefined && headerCells === size + 1))) return undefined;
      if (values.length !== size * size) {
        const sized = new Float64Array(size * size);
        sized.set(values.subarray(0, size));
        values = sized;
      }
    } else if (column !== size) {
      return undefined; // a short row
    }
    rowLines[row] = line;
    row++;
    rowStart += size;
  }
  if (size < 0 || row !== size) return undefined;
  rowLines.length = size;
  return { size, values, rowLines };
}

/** The ASCII bytes[start, end) as a string. */
function latin1(bytes: Uint8Array, start: number, end: number): string {
  return Buffer.from(bytes.buffer, bytes.byteOffset + start, end - start).toString("latin1");
}

/** Dekker's splitting constant 2^27 + 1 (Veltkamp's split). */
const SPLITTER = 134217729;

/**
 * a·b − product exactly, where product = fl(a·b), barring overflow and underflow:
 * Dekker's (1971) error-free product, in the form of Ogita, Rump and Oishi
 * (2005, "Accurate sum and dot product", SIAM J. Sci. Comput. 26(6):1955-1988,
 * Algorithm 3.3 TwoProduct).
 */
function productError(a: number, b: number, product: number): number {
  let t = SPLITTER * a;
  const aHigh = t - (t - a);
  const aLow = a - aHigh;
  t = SPLITTER * b;
  const bHigh = t - (t - b);
  const bLow = b - bHigh;
  return aLow * bLow - (product - aHigh * bHigh - aLow * bHigh - aHigh * bLow);
}

/** Bits of a double, for its unit in the last place. */
const doubleBits = new DataView(new ArrayBuffer(8));

/**
 * The double nearest to m · 10^exponent, m = high · 10^lowDigits + low with
 * high < 10^15 and lowDigits ≤ 4 (so m < 10^19), or UNDECIDED when it does not
 * apply (exponent > 0 or < −21, or the search meets a power of two).
 *
 * Why it is exact. high·10^lowDigits = a + b by the error-free product, b + low
 * is an integer below 2^14 (exact), and Dekker's fast two-sum of a and b + low
 * gives s = fl(m) and t = m − s exactly. For exponent = 0 the answer is s. Else let P = 10^k, k = −exponent ≤ 21,
 * y = fl(s / P), Q = m / P: |y − Q| < 1.5 ulp(y). For the current y = M·2^F
 * (a positive normal, not a power of two, ulp(y) = 2^F) let W = ulp(y)·P:
 * u = fl(y·P) and v = y·P − u (error-free product), and R = m − y·P =
 * ((s − u) + t) − v. With g = 2^min(0, F + k), s, t, y·P = M·5^k·2^(F+k), u and
 * v are all multiples of g; |t|, |v| < W, |s − u| < 3.5W, |(s − u) + t| < 4.5W
 * and |R| < 1.5W; and W/g is 5^k < 2^49 (F + k ≤ 0) or W ≤ y·P/2^52 < 2^12
 * (F + k > 0; g = 1). So each exact intermediate is a multiple of g below
 * 2^53·g, a double, and every operation is exact: R is exact. Then Q − y =
 * R / P, and comparing R with ±W/2 (exact) says whether Q is nearer to y or to a
 * neighbour y ± ulp(y), or halfway (ties go to the even M, as IEEE 754 rounds).
 * A step moves y one unit towards Q, within its binade (a power of two reached
 * gives UNDECIDED), and leaves |y − Q| < ulp(y)/2, so one step suffices.
 */
function nearestDecimal(high: number, low: number, lowDigits: number, exponent: number): number {
  if (exponent > 0 || exponent < -MAX_QUOTIENT_POWER) return UNDECIDED;
  const scale = EXACT_POWERS_OF_TEN[lowDigits];
  const scaled = high * scale;
  const rest = productError(high, scale, scaled) + low;
  const s = scaled + rest;
  const t = rest - (s - scaled);
  if (exponent === 0) return s;
  const power = EXACT_POWERS_OF_TEN[-exponent];
  let y = s / power;
  for (let attempt = 0; attempt < 2; attempt++) {
    doubleBits.setFloat64(0, y);
    const highWord = doubleBits.getUint32(0);
    const lowWord = doubleBits.getUint32(4);
    if ((highWord & 0xfffff) === 0 && lowWord === 0) return UNDECIDED;
    // ulp(y) = 2^(biased exponent − 1075): the double with biased exponent (biased exponent − 52) and no fraction.
    doubleBits.setUint32(0, ((highWord >>> 20) - 52) << 20);
    doubleBits.setUint32(4, 0);
    const ulp = doubleBits.getFloat64(0);
    const u = y * power;
    const remainder = s - u + t - productError(y, power, u);
    const half = ulp * power * 0.5;
    if (remainder > half) y += ulp;
    else if (remainder < -half) y -= ulp;
    else if (remainder === half) return (lowWord & 1) === 0 ? y : y + ulp;
    else if (remainder === -half) return (lowWord & 1) === 0 ? y : y - ulp;
    else return y;
  }
  return UNDECIDED;
}

/** NaN or ±Infinity for the words nan, inf, infinity (any case, optional sign) in bytes[start, end), else 0. */
function nonFiniteWordValue(bytes: Uint8Array, start: number, end: number): number {
  let p = start;
  let sign = 1;
  const c = bytes[p];
  if (c === MINUS || c === PLUS) {
    if (c === MINUS) sign = -1;
    p++;
  }
  const length = end - p;
  const lower = (k: number): number => bytes[p + k] | ASCII_LOWER_CASE_BIT;
  if (length === 3 && lower(0) === 110 && lower(1) === 97 && lower(2) === 110) return Number.NaN; // nan
  if ((length === 3 || length === 8) && lower(0) === 105 && lower(1) === 110 && lower(2) === 102) {
    // inf, infinity
    if (length === 3) return sign * Infinity;
    if (lower(3) === 105 && lower(4) === 110 && lower(5) === 105 && lower(6) === 116 && lower(7) === 121) {
      return sign * Infinity;
    }
  }
  return 0;
}

function grown(values: Float64Array): Float64Array {
  const larger = new Float64Array(2 * values.length);
  larger.set(values);
  return larger;
}

/** The bytes decoded as readFileSync(path, "utf8") decodes a file, with its failure (a text too long for a string) as TextFileReader words it. */
function decodeUtf8(bytes: Uint8Array, file: string): string {
  try {
    return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString("utf8");
  } catch (error) {
    throw new InputError(`cannot read ${file}: ${systemReason(error)}`, { file });
  }
}


/**
 * Value of text[start, end) if it is in decimal syntax, else NaN. Equal to
 * Number(text.slice(start, end)) whenever the syntax is decimal.
 */
export function parseDecimalSpan(text: string, start: number, end: number): number {
  const value = scanDecimal(text, start, end);
  return scanEnd === end ? value : NOT_DECIMAL;
}

/** Where the last scanDecimal stopped: one past its number, or its start if none was there. */
let scanEnd = 0;

/**
 * Reads the longest decimal number at text[start …] (not beyond `stop`), sets
 * `scanEnd` one past it and returns its value (NaN and scanEnd = start if no
 * number starts there). The value equals Number() of the scanned text.
 */
function scanDecimal(text: string, start: number, stop: number): number {
  let p = start;
  let negative = false;
  let c = text.charCodeAt(p);
  if (c === MINUS) {
    negative = true;
    p++;
  } else if (c === PLUS) {
    p++;
  }

  // m = high · 10^lowDigits + low: the first 15 significant digits, then up to 4 more.
  let high = 0;
  let low = 0;
  let lowDigits = 0;
  let significantDigits = 0;
  let exponent = 0;
  let sawDigit = false;

  // One digit loop reads the integer part, then (after a dot) the fraction, whose length is the exponent.
  let fractionStart = -1;
  for (;;) {
    for (; p < stop; p++) {
      c = text.charCodeAt(p);
      if (c < ZERO || c > NINE) break;
      sawDigit = true;
      if (significantDigits !== 0 || c !== ZERO) {
        if (significantDigits < HIGH_DIGITS) {
          high = high * 10 + (c - ZERO);
        } else if (significantDigits < MAX_SIGNIFICANT_DIGITS) {
          low = low * 10 + (c - ZERO);
          lowDigits++;
        }
        significantDigits++;
      }
    }
    if (fractionStart >= 0) {
      exponent = fractionStart - p;
      break;
    }
    if (p >= stop || text.charCodeAt(p) !== DOT) break;
    fractionStart = ++p;
  }
  if (!sawDigit) {
    scanEnd = start;
    return NOT_DECIMAL;
  }

  if (p < stop && ((c = text.charCodeAt(p)) === LOWER_E || c === UPPER_E)) {
    let q = p + 1;
    let exponentNegative = false;
    if (q < stop) {
      c = text.charCodeAt(q);
      if (c === MINUS) {
        exponentNegative = true;
        q++;
      } else if (c === PLUS) {
        q++;
      }
    }
    const digitsStart = q;
    let explicit = 0;
    for (; q < stop; q++) {
      c = text.charCodeAt(q);
      if (c < ZERO || c > NINE) break;
      if (explicit < 100000) explicit = explicit * 10 + (c - ZERO);
    }
    // Without exponent digits the "e" is not part of the number.
    if (q > digitsStart) {
      p = q;
      exponent += exponentNegative ? -explicit : explicit;
    }
  }
  scanEnd = p;

  if (significantDigits === 0) return negative ? -0 : 0;
  if (significantDigits <= MAX_SIGNIFICANT_DIGITS) {
    // (With more than 19 significant digits Number() decides.) m is exact when the
    // computed value is below 2^53: rounding is monotonic, so a sum that reaches 2^53 stays there.
    const mantissa = lowDigits === 0 ? high : high * EXACT_POWERS_OF_TEN[lowDigits] + low;
    let magnitude: number;
    if (mantissa < TWO_TO_53 && exponent >= -22 && exponent <= 22) {
      magnitude = exponent >= 0 ? mantissa * EXACT_POWERS_OF_TEN[exponent] : mantissa / EXACT_POWERS_OF_TEN[-exponent];
    } else {
      magnitude = nearestDecimal(high, low, lowDigits, exponent);
    }
    if (magnitude !== UNDECIDED) return negative ? -magnitude : magnitude;
  }
  return Number(text.slice(start, p));
}

/** The Number() spelling of a non-finite word ("NaN", "Infinity", "-Infinity"), or "" if it is not one. */
function nonFiniteWord(text: string, start: number, end: number): string {
  let p = start;
  let sign = "";
  const c = text.charCodeAt(p);
  if (c === MINUS || c === PLUS) {
    sign = c === MINUS ? "-" : "";
    p++;
  }
  const word = text.slice(p, end).toLowerCase();
  if (word === "nan") return "NaN";
  if (word === "inf" || word === "infinity") return `${sign}Infinity`;
  return "";
}

/** End of the cell that starts at `start`: the next separator or the end of the line. */
function tokenEnd(text: string, start: number, stop: number, commaSeparated: boolean): number {
  let p = start;
  for (; p < stop; p++) {
    const c = text.charCodeAt(p);
    if (c === SPACE || c === TAB || (commaSeparated && c === COMMA)) break;
  }
  return p;
}

function skipWhitespace(text: string, p: number, stop: number): number {
  while (p < stop) {
    const c = text.charCodeAt(p);
    if (c !== SPACE && c !== TAB) break;
    p++;
  }
  return p;
}

