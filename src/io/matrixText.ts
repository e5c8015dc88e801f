import { InputError } from "../errors.js";

/**
 * One square matrix as text: N lines of N numbers, separated by a tab, a comma
 * (spaces around it allowed) or runs of spaces and tabs. The delimiter is
 * chosen per file: commas if the first non-blank line has one, else whitespace.
 * No header. A UTF-8 byte-order mark, CRLF line ends and blank lines are tolerated.
 *
 * The scanner walks the string with charCodeAt and never splits it. A cell in
 * plain decimal syntax ([+-] digits [. digits] [e [+-] digits]) with at most 16
 * significant digits forming a mantissa below 2^53 and a decimal exponent of at
 * most 22 in magnitude is converted with one exact multiplication or division,
 * which IEEE 754 rounds correctly (Clinger 1990, "How to read floating point
 * numbers accurately", PLDI '90, ACM SIGPLAN Notices 25(6):92-101); any other
 * cell in decimal syntax goes to Number(), so every value equals Number(cell).
 */
export interface MatrixTextOptions {
  /**
   * Accept NaN and ±Inf on the diagonal (written nan, inf, infinity in any case,
   * with an optional sign), e.g. a correlation matrix after atanh. Off-diagonal
   * non-finite cells are rejected either way.
   */
  allowNonFiniteDiagonal?: boolean;
}

export interface ParsedMatrixText {
  /** N, the number of rows and of columns. */
  size: number;
  /** Row-major cells, length N × N. */
  values: Float64Array;
  /** 1-based file line of each matrix row, for locating later checks. */
  rowLines: number[];
}

const TAB = 9;
const CR = 13;
const SPACE = 32;
const PLUS = 43;
const COMMA = 44;
const MINUS = 45;
const DOT = 46;
const ZERO = 48;
const NINE = 57;
const UPPER_E = 69;
const LOWER_E = 101;

/** 10^0 … 10^22: every one is exactly representable as a double. */
const EXACT_POWERS_OF_TEN = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19,
  1e20, 1e21, 1e22,
];
const TWO_TO_53 = 9007199254740992;
/** What parseDecimalSpan returns for text not in decimal syntax (a decimal never parses to NaN). */
const NOT_DECIMAL = Number.NaN;

export function parseMatrixText(text: string, file: string, options: MatrixTextOptions = {}): ParsedMatrixText {
  const allowNonFiniteDiagonal = options.allowNonFiniteDiagonal === true;
  const end = text.length;
  let pos = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const commaSeparated = firstContentLineHasComma(text, pos);

  let line = 0;
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
        `matrix is not square: it has ${size} columns but more than ${size} rows (row ${row + 1} is on this line)`,
        { file, line },
      );
    }

    let column = 0;
    for (;;) {
      if (size >= 0 && column >= size) {
        throw new InputError(`matrix is not square: row ${row + 1} has more than ${size} values`, {
          file,
          line,
          column: column + 1,
        });
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
          throw new InputError(`empty cell in column ${column + 1}`, { file, line, column: column + 1 });
        }
        const word = nonFiniteWord(text, start, p);
        if (word === "") {
          throw new InputError(
            `cell '${text.slice(start, p)}' at row ${row + 1}, column ${column + 1} is not a number`,
            { file, line, column: column + 1 },
          );
        }
        value = Number(word);
      }
      // While the first row is read `row` is 0, so the diagonal test holds before N is known.
      if (!Number.isFinite(value) && !(allowNonFiniteDiagonal && column === row)) {
        throw new InputError(
          `cell '${text.slice(start, p)}' at row ${row + 1}, column ${column + 1} is not finite` +
            (allowNonFiniteDiagonal ? " (only the diagonal may be NaN or infinite)" : ""),
          { file, line, column: column + 1 },
        );
      }
      if (size < 0) firstRow.push(value);
      else values[row * size + column] = value;
      column++;

      p = skipWhitespace(text, p, stop);
      if (p === stop) break;
      if (commaSeparated) {
        if (text.charCodeAt(p) !== COMMA) {
          throw new InputError(`expected a comma after column ${column}`, { file, line, column: column + 1 });
        }
        p = skipWhitespace(text, p + 1, stop);
        if (p === stop) {
          throw new InputError(`empty cell in column ${column + 1} (comma at the end of the line)`, {
            file,
            line,
            column: column + 1,
          });
        }
      }
    }

    if (size < 0) {
      size = column;
      values = new Float64Array(size * size);
      values.set(firstRow);
    } else if (column !== size) {
      throw new InputError(`matrix is not square: row ${row + 1} has ${column} values, expected ${size}`, {
        file,
        line,
        column: column + 1,
      });
    }
    rowLines.push(line);
    row++;
    pos = lineEnd + 1;
  }

  if (size < 0) {
    throw new InputError("empty matrix file: expected N lines of N numbers", { file, line: 1 });
  }
  if (row !== size) {
    throw new InputError(`matrix is not square: ${row} rows of ${size} values`, {
      file,
      line: rowLines[rowLines.length - 1],
    });
  }
  return { size, values, rowLines };
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

  let mantissa = 0;
  let significantDigits = 0;
  let exponent = 0;
  let sawDigit = false;
  let exact = true;

  for (; p < stop; p++) {
    c = text.charCodeAt(p);
    if (c < ZERO || c > NINE) break;
    sawDigit = true;
    if (mantissa !== 0 || c !== ZERO) {
      if (significantDigits < 16) {
        mantissa = mantissa * 10 + (c - ZERO);
        significantDigits++;
      } else {
        exact = false;
      }
    }
  }
  if (p < stop && text.charCodeAt(p) === DOT) {
    for (p++; p < stop; p++) {
      c = text.charCodeAt(p);
      if (c < ZERO || c > NINE) break;
      sawDigit = true;
      if (mantissa !== 0 || c !== ZERO) {
        if (significantDigits < 16) {
          mantissa = mantissa * 10 + (c - ZERO);
          significantDigits++;
          exponent--;
        } else {
          exact = false;
        }
      } else {
        exponent--;
      }
    }
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

  if (mantissa === 0) return negative ? -0 : 0;
  if (exact && mantissa < TWO_TO_53 && exponent >= -22 && exponent <= 22) {
    const magnitude =
      exponent >= 0 ? mantissa * EXACT_POWERS_OF_TEN[exponent] : mantissa / EXACT_POWERS_OF_TEN[-exponent];
    return negative ? -magnitude : magnitude;
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

function firstContentLineHasComma(text: string, pos: number): boolean {
  const end = text.length;
  while (pos < end) {
    let lineEnd = text.indexOf("\n", pos);
    if (lineEnd < 0) lineEnd = end;
    let blank = true;
    for (let p = pos; p < lineEnd; p++) {
      const c = text.charCodeAt(p);
      if (c === COMMA) return true;
      if (c !== SPACE && c !== TAB && c !== CR) blank = false;
    }
    if (!blank) return false;
    pos = lineEnd + 1;
  }
  return false;
}
