import { CholeskyDecomposition, Matrix, solve } from "ml-matrix";
import { InputError, type InputLocation } from "../errors.js";
import type { DesignMatrix } from "./designMatrix.js";
import { rankReport } from "./rank.js";

/**
 * A contrast c over the design columns; the tested quantity is c'β.
 * Written as a term name (`age`, a slope), `factor[level]` (its treatment
 * coefficient; the reference level's is 0), products of those with `:` for
 * interactions (`group[patient]:age`), scalar multiples and sums
 * (`0.5*site[b] + 0.5*site[c]`), `intercept`, or a numeric vector.
 */
export interface Contrast {
  name: string;
  /** "t" for one row (a directional test), "F" for several rows (an omnibus test). */
  kind: "t" | "F";
  /** The first (for t, the only) row. */
  vector: Float64Array;
  /** Every row of C (q × p); one row for a t contrast. */
  rows: Float64Array[];
  /** The expression as written, for reports. */
  expression: string;
  /** How a contrast was read when that differs from what its form suggests (a factor named alone that has one column). */
  note?: string;
}

/** A contrast as the design file may write it: one expression or vector, or several rows (an F contrast). */
export type ContrastExpression = string | number[] | (string | number[])[];

type Atom = { variable: string; level?: string };

function parseAtoms(text: string, where: InputLocation, whole: string): Atom[] {
  return text.split(":").map((piece) => {
    const trimmed = piece.trim();
    const match = /^(`[^`]+`|[A-Za-z_.][A-Za-z0-9_.]*)(?:\[([^\]]+)\])?$/.exec(trimmed);
    if (!match) {
      throw new InputError(
        `cannot read '${trimmed}' in the contrast '${whole}'`,
        where,
        "write a column name, factor[level], products with ':', scalar multiples and sums, e.g. `group[patient] - group[control]`",
      );
    }
    const variable = match[1].replace(/^`|`$/g, "");
    const level = match[2]?.trim();
    return level === undefined ? { variable } : { variable, level };
  });
}

/**
 * Splits `a - 2*b + 0.5*c*3` into signed terms: each term is a product of
 * numbers and exactly one reference (a name, `name[level]`, or such joined by `:`).
 */
function splitTerms(text: string, where: InputLocation): { coefficient: number; body: string }[] {
  type Token = { kind: "number"; value: number } | { kind: "ref"; text: string } | { kind: "op"; text: string };
  const tokens: Token[] = [];
  const pattern =
    /\s*(?:([0-9]*\.?[0-9]+(?:[eE][+-]?[0-9]+)?)|((?:`[^`]+`|[A-Za-z_.][A-Za-z0-9_.]*)(?:\[[^\]]*\])?(?:\s*:\s*(?:`[^`]+`|[A-Za-z_.][A-Za-z0-9_.]*)(?:\[[^\]]*\])?)*)|([-+*]))/y;
  let pos = 0;
  while (pos < text.length) {
    if (/^\s*$/.test(text.slice(pos))) break;
    pattern.lastIndex = pos;
    const match = pattern.exec(text);
    if (!match) {
      throw new InputError(
        `cannot read the contrast '${text}' at position ${pos + 1}`,
        where,
        "write a column name, factor[level], products with ':', scalar multiples and sums, e.g. `group[patient] - group[control]`",
      );
    }
    if (match[1] !== undefined) tokens.push({ kind: "number", value: Number(match[1]) });
    else if (match[2] !== undefined) tokens.push({ kind: "ref", text: match[2] });
    else tokens.push({ kind: "op", text: match[3] });
    pos = pattern.lastIndex;
  }
  const out: { coefficient: number; body: string }[] = [];
  let i = 0;
  while (i < tokens.length) {
    let coefficient = 1;
    while (tokens[i]?.kind === "op" && (tokens[i] as { text: string }).text !== "*") {
      if ((tokens[i] as { text: string }).text === "-") coefficient = -coefficient;
      i++;
    }
    let body: string | undefined;
    let expectFactor = true;
    while (i < tokens.length) {
      const token = tokens[i];
      if (expectFactor) {
        if (token.kind === "number") coefficient *= token.value;
        else if (token.kind === "ref") {
          if (body !== undefined) throw new InputError(`a term of the contrast '${text}' multiplies two columns; use ':' for an interaction`, where);
          body = token.text.replace(/\s*:\s*/g, ":");
        } else throw new InputError(`misplaced '${token.text}' in the contrast '${text}'`, where);
        expectFactor = false;
        i++;
      } else if (token.kind === "op" && token.text === "*") {
        expectFactor = true;
        i++;
      } else if (token.kind === "op") {
        break;
      } else {
        throw new InputError(`missing operator in the contrast '${text}'`, where);
      }
    }
    if (expectFactor) throw new InputError(`the contrast '${text}' ends with an operator`, where);
    if (body === undefined) throw new InputError(`a term of the contrast '${text}' is a number without a column`, where);
    out.push({ coefficient, body });
  }
  return out;
}

function sameVariables(a: string[], b: string[]): boolean {
  return a.length === b.length && [...a].sort().join("\u0000") === [...b].sort().join("\u0000");
}

/**
 * Resolves a contrast against the design's columns; errors name the design key.
 * Several rows (a list of expressions or vectors), or a bare term name with
 * more than one column (a factor with three levels, say), make an F contrast.
 */
export function parseContrast(
  name: string,
  expression: ContrastExpression,
  design: DesignMatrix,
  where: InputLocation,
): Contrast {
  let rowExpressions: (string | number[])[] | undefined;
  if (Array.isArray(expression) && expression.some((item) => typeof item !== "number")) {
    rowExpressions = expression as (string | number[])[];
  } else if (typeof expression === "string") {
    const term = termColumns(expression.trim(), design);
    if (term && term.length > 1) rowExpressions = term.map((j) => Array.from({ length: design.cols }, (_, k) => (k === j ? 1 : 0)));
    if (term && term.length === 1) {
      // A factor term named alone with one column (a two-level factor): its F test has one row, and an F
      // with one row is the square of the t of that column, so it is tested as that t contrast.
      const vector = new Float64Array(design.cols);
      vector[term[0]] = 1;
      checkContrastVariance([vector], design, where);
      const column = design.columns[term[0]].name;
      return {
        name,
        kind: "t",
        vector,
        rows: [vector],
        expression: expression.trim(),
        note: `'${name}' names '${expression.trim()}' alone, which has one design column (${column}): tested as the t contrast ${column} (an F test of one row is this t squared; with \`tail: both\` the two p-values are the same)`,
      };
    }
  }
  if (rowExpressions) {
    if (rowExpressions.length === 0) throw new InputError("an F contrast needs at least one row", where);
    const rows = rowExpressions.map((row, k) => parseContrastRow(`${name} row ${k + 1}`, row, design, where).vector);
    checkIndependentRows(rows, where);
    checkContrastVariance(rows, design, where);
    const written = typeof expression === "string" ? expression.trim() : JSON.stringify(expression);
    if (rows.length === 1) return { name, kind: "t", vector: rows[0], rows, expression: written };
    return { name, kind: "F", vector: rows[0], rows, expression: written };
  }
  return parseContrastRow(name, expression as string | number[], design, where);
}

/** The design columns of a term named bare (e.g. `site` or `group:site`), when every variable in it is a factor or numeric without levels. */
function termColumns(text: string, design: DesignMatrix): number[] | undefined {
  if (!/^[A-Za-z_.`][A-Za-z0-9_.`:\s]*$/.test(text)) return undefined;
  const names = text.split(":").map((n) => n.trim().replace(/^`|`$/g, ""));
  if (!names.every((n) => design.variables.has(n))) return undefined;
  if (!names.some((n) => design.variables.get(n)!.kind === "factor")) return undefined;
  const termIndex = design.formula.terms.findIndex((t) => sameVariables(t, names));
  if (termIndex < 0) return undefined;
  return design.columns.flatMap((c, j) => (c.term === termIndex ? [j] : []));
}

function checkIndependentRows(rows: Float64Array[], where: InputLocation): void {
  const basis: Float64Array[] = [];
  for (const row of rows) {
    const r = Float64Array.from(row);
    for (let pass = 0; pass < 2; pass++) {
      for (const b of basis) {
        let f = 0;
        for (let i = 0; i < r.length; i++) f += b[i] * r[i];
        for (let i = 0; i < r.length; i++) r[i] -= f * b[i];
      }
    }
    let norm = 0;
    for (const v of r) norm += v * v;
    norm = Math.sqrt(norm);
    let scale = 0;
    for (const v of row) scale += v * v;
    if (!(norm > 1e-10 * Math.sqrt(scale))) {
      throw new InputError("the rows of this F contrast are linearly dependent; remove the redundant row", where);
    }
    basis.push(r.map((v) => v / norm));
  }
}

function parseContrastRow(
  name: string,
  expression: string | number[],
  design: DesignMatrix,
  where: InputLocation,
): Contrast {
  const p = design.cols;
  const vector = new Float64Array(p);
  const columnNames = design.columns.map((c) => c.name);
  let written: string;
  if (Array.isArray(expression)) {
    written = `[${expression.join(", ")}]`;
    if (expression.length !== p) {
      throw new InputError(
        `the contrast vector has ${expression.length} numbers but the design has ${p} columns (${columnNames.join(", ")})`,
        where,
      );
    }
    if (!expression.every(Number.isFinite)) throw new InputError("a contrast vector must list finite numbers", where);
    expression.forEach((v, j) => (vector[j] = v));

  } else {
    written = expression.trim();
    if (written === "") throw new InputError("the contrast is empty", where);
    const term = termColumns(written, design);
    if (term && term.length > 1) {
      const columns = term.map((j) => columnNames[j]);
      throw new InputError(
        `'${written}' has ${term.length} design columns (${columns.join(", ")}), so it is not one row of a contrast`,
        where,
        `name one column per row, e.g. [${columns.join(", ")}] as the rows of an F contrast, or make '${written}' the whole contrast (not a list) to test all its columns`,
      );
    }
    if (term) vector[term[0]] = 1;
    for (const { coefficient, body } of term ? [] : splitTerms(written, where)) {
      if (body === "intercept") {
        const j = columnNames.indexOf("intercept");
        if (j < 0) throw new InputError("the contrast names the intercept, but the model has none", where);
        vector[j] += coefficient;
        continue;
      }
      const atoms = parseAtoms(body, where, written);
      const variablesNamed = atoms.map((a) => a.variable);
      for (const atom of atoms) {
        const variable = design.variables.get(atom.variable);
        if (!variable) {
          throw new InputError(
            `the contrast names '${atom.variable}', which is not in the model (${[...design.variables.keys()].join(", ") || "intercept only"})`,
            where,
          );
        }
        if (variable.kind === "factor" && atom.level === undefined) {
          throw new InputError(
            `'${atom.variable}' is a factor: inside the expression '${written}' name one of its levels, e.g. ${atom.variable}[${variable.levels[1]}] - ${atom.variable}[${variable.levels[0]}] (a contrast that is '${atom.variable}' and nothing else tests all its levels)`,
            where,
          );
        }
        if (variable.kind === "factor" && !variable.levels.includes(atom.level!)) {
          throw new InputError(
            `'${atom.level}' is not a level of '${atom.variable}' (levels: ${variable.levels.join(", ")})`,
            where,
          );
        }
        if (variable.kind === "numeric" && atom.level !== undefined) {
          throw new InputError(`'${atom.variable}' is numeric and has no levels; write it without [${atom.level}]`, where);
        }
      }
      const termIndex = design.formula.terms.findIndex((t) => sameVariables(t, variablesNamed));
      if (termIndex < 0) {
        throw new InputError(
          `the model has no term '${variablesNamed.join(":")}' (terms: ${design.formula.terms.map((t) => t.join(":")).join(", ")})`,
          where,
        );
      }
      const column = design.columns.findIndex(
        (c) =>
          c.term === termIndex &&
          atoms.every((atom) => c.parts.some((part) => part.variable === atom.variable && part.level === atom.level)),
      );
      if (column >= 0) {
        vector[column] += coefficient;
        continue;
      }
      // No column: a factor at its reference level, whose treatment coefficient is 0.
      const atReference = atoms.some((atom) => {
        const variable = design.variables.get(atom.variable)!;
        return variable.kind === "factor" && atom.level === variable.levels[0];
      });
      if (!atReference) {
        throw new InputError(`the contrast term '${body}' matches no design column (${columnNames.join(", ")})`, where);
      }
    }
  }
  if (vector.every((v) => v === 0)) {
    throw new InputError(
      `the contrast '${written}' is zero on every design column, so it tests nothing (reference levels have coefficient 0)`,
      where,
    );
  }
  const notFinite = vector.findIndex((v) => !Number.isFinite(v));
  if (notFinite >= 0) {
    throw new InputError(`the contrast '${written}' gives the column '${columnNames[notFinite]}' a weight that is not a finite number (a number in it overflows)`, where, "write weights of ordinary size, e.g. `age` or `0.5*site[b] + 0.5*site[c]`");
  }
  checkEstimable(vector, design, where, written);
  checkContrastVariance([vector], design, where);
  return { name, kind: "t", vector, rows: [vector], expression: written };
}

/**
 * c'β is estimable when c lies in the row space of X (Searle, Linear Models,
 * 1971, §5.4). With a full-rank X every c is; the check guards the library
 * entry points that accept other designs.
 */
function checkEstimable(vector: Float64Array, design: DesignMatrix, where: InputLocation, written: string): void {
  const report = rankReport(design.values, design.rows, design.cols);
  if (report.rank === design.cols) return;
  const involved = vector.reduce<string[]>((list, v, j) => (v !== 0 ? [...list, design.columns[j].name] : list), []);
  throw new InputError(`the contrast '${written}' is not estimable in this design (columns ${involved.join(", ")})`, where);
}

/**
 * The contrast's variance factor must be usable: c'(X'X)⁻¹c finite and
 * positive for a t contrast, C(X'X)⁻¹C' finite and positive definite for an
 * F contrast (rows of huge or tiny weights overflow or vanish), else every
 * edge's statistic would be empty.
 */
function checkContrastVariance(rows: Float64Array[], design: DesignMatrix, where: InputLocation): void {
  const p = design.cols;
  const x = new Matrix(design.rows, p);
  for (let i = 0; i < design.rows; i++) for (let j = 0; j < p; j++) x.set(i, j, design.values[i * p + j]);
  const c = new Matrix(rows.map((r) => Array.from(r)));
  let usable: boolean;
  try {
    const raw = c.mmul(solve(x.transpose().mmul(x), c.transpose()));
    const product = raw.clone().add(raw.transpose()).mul(0.5); // symmetric up to rounding; Cholesky needs it exactly
    const finite = product.to1DArray().every(Number.isFinite);
    usable = finite && (rows.length === 1 ? product.get(0, 0) > 0 : new CholeskyDecomposition(product).isPositiveDefinite());
  } catch {
    usable = false;
  }
  if (!usable) {
    throw new InputError(
      rows.length === 1
        ? "this contrast's variance factor c'(X'X)⁻¹c is not a finite positive number (its weights overflow or vanish), so no edge would have a statistic"
        : "this F contrast's matrix C(X'X)⁻¹C' is not finite and invertible (its weights overflow or vanish), so no edge would have a statistic",
      where,
      "write weights of ordinary size (e.g. 1 or 0.5)",
    );
  }
}
