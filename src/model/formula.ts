import { InputError, type InputLocation } from "../errors.js";

/**
 * A model formula in the usual Wilkinson–Rogers notation (Wilkinson & Rogers
 * 1973, Applied Statistics 22:392): `group + age + sex`, `- 1` or `0 +` to drop
 * the intercept, `a:b` for an interaction, `a*b` for `a + b + a:b`, `1` alone
 * for an intercept-only (one-sample) model. Column names with other characters
 * are written in backticks.
 */
export interface Formula {
  intercept: boolean;
  /** Each term is the list of variables it multiplies (length 1 for a main effect). */
  terms: string[][];
}

type Token =
  | { kind: "name"; text: string; at: number }
  | { kind: "number"; text: string; at: number }
  | { kind: "op"; text: "+" | "-" | ":" | "*" | "(" | ")"; at: number };

function tokenize(source: string, where: InputLocation): Token[] {
  const tokens: Token[] = [];
  let i = 0;
  while (i < source.length) {
    const ch = source[i];
    if (/\s/.test(ch)) {
      i++;
    } else if ("+-:*()".includes(ch)) {
      tokens.push({ kind: "op", text: ch as "+", at: i });
      i++;
    } else if (ch === "`") {
      const end = source.indexOf("`", i + 1);
      if (end < 0) throw new InputError(`unclosed backtick in model formula '${source}'`, where);
      if (end === i + 1) throw new InputError(`empty column name in backticks in model formula '${source}'`, where);
      tokens.push({ kind: "name", text: source.slice(i + 1, end), at: i });
      i = end + 1;
    } else if (/[0-9]/.test(ch)) {
      const match = /^[0-9]+(\.[0-9]+)?/.exec(source.slice(i))!;
      tokens.push({ kind: "number", text: match[0], at: i });
      i += match[0].length;
    } else if (/[A-Za-z_.]/.test(ch)) {
      const match = /^[A-Za-z_.][A-Za-z0-9_.]*/.exec(source.slice(i))!;
      tokens.push({ kind: "name", text: match[0], at: i });
      i += match[0].length;
    } else {
      throw new InputError(
        `unexpected character '${ch}' at position ${i + 1} of model formula '${source}'`,
        where,
        "write column names with letters, digits, '_' and '.', or quote them in backticks",
      );
    }
  }
  return tokens;
}

/** Parses a model formula; `where` locates it (design file and key) for errors. */
export function parseFormula(source: string, where: InputLocation = { key: "model" }): Formula {
  const outsideBackticks = source.replace(/`[^`]*`/g, "``");
  if (outsideBackticks.includes("~")) {
    const right = outsideBackticks.slice(outsideBackticks.lastIndexOf("~") + 1).trim() === "" ? "" : source.slice(source.lastIndexOf("~") + 1).trim();
    throw new InputError(
      `the model formula '${source.trim()}' has a '~': the response is always the connectivity of each edge, so the model is only the right-hand side`,
      where,
      `write \`model: ${right === "" ? "group + age" : right}\``,
    );
  }
  const text = source.trim();
  if (text === "") throw new InputError("the model formula is empty", where, "e.g. `model: group + age + sex`");
  const tokens = tokenize(text, where);
  let pos = 0;
  let intercept = true;
  const terms: string[][] = [];
  const seen = new Set<string>();

  const fail = (message: string): never => {
    throw new InputError(`${message} in model formula '${text}'`, where);
  };
  const addTerm = (term: string[]) => {
    const key = [...term].sort().join(":");
    if (new Set(term).size !== term.length) fail(`variable repeated within the term '${term.join(":")}'`);
    if (!seen.has(key)) {
      seen.add(key);
      terms.push(term);
    }
  };
  // product := name (':' name)*
  const product = (): string[] => {
    const parts: string[] = [];
    for (;;) {
      const token = tokens[pos];
      if (!token || token.kind !== "name") fail(`expected a column name at position ${(token?.at ?? text.length) + 1}`);
      parts.push(token!.text);
      pos++;
      if (tokens[pos]?.kind === "op" && tokens[pos].text === ":") pos++;
      else return parts;
    }
  };

  let sign: "+" | "-" = "+";
  let expectTerm = true;
  while (pos < tokens.length) {
    const token = tokens[pos];
    if (expectTerm) {
      if (pos === 0 && token.kind === "op" && (token.text === "+" || token.text === "-")) {
        sign = token.text;
        pos++;
        continue;
      }
      if (token.kind === "number") {
        if (token.text === "1") intercept = sign === "+";
        else if (token.text === "0" && sign === "+") intercept = false;
        else fail(`unexpected number '${token.text}' (only 1 or 0, for the intercept)`);
        pos++;
      } else if (token.kind === "name") {
        if (sign === "-") fail(`removing the term '${token.text}' is not supported; leave it out instead`);
        const left = product();
        if (tokens[pos]?.kind === "op" && tokens[pos].text === "*") {
          pos++;
          const right = product();
          addTerm(left);
          addTerm(right);
          addTerm([...left, ...right]);
          if (tokens[pos]?.kind === "op" && tokens[pos].text === "*") {
            fail("chains of '*' are not supported; write the interactions out with ':'");
          }
        } else {
          addTerm(left);
        }
      } else {
        fail(`unexpected '${token.text}' at position ${token.at + 1}`);
      }
      expectTerm = false;
    } else {
      if (token.kind === "op" && (token.text === "+" || token.text === "-")) {
        sign = token.text;
        pos++;
        expectTerm = true;
      } else {
        fail(`expected '+' or '-' at position ${token.at + 1}, found '${token.text}'`);
      }
    }
  }
  if (expectTerm) fail("the formula ends with an operator");
  if (!intercept && terms.length === 0) fail("the model has no columns");
  return { intercept, terms };
}

/** The formula written back in canonical form, e.g. `1 + group + age + group:age`. */
export function formatFormula(formula: Formula): string {
  const quote = (name: string) => (/^[A-Za-z_.][A-Za-z0-9_.]*$/.test(name) ? name : `\`${name}\``);
  const parts = [formula.intercept ? "1" : "0", ...formula.terms.map((term) => term.map(quote).join(":"))];
  return parts.join(" + ");
}

/** Every column of the participants table the formula uses, in order of first use. */
export function formulaVariables(formula: Formula): string[] {
  const out: string[] = [];
  for (const term of formula.terms) for (const name of term) if (!out.includes(name)) out.push(name);
  return out;
}
