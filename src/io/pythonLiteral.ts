/**
 * The small subset of Python literal syntax that .npy headers are written in:
 * dicts with string keys, tuples, lists, quoted strings without escapes,
 * integers, True, False and None (the header is produced by Python's repr()).
 */
/** Values of the header literal: str, int, bool, None, tuple/list (as arrays), dict (as Map). */
export type PyValue = string | number | boolean | null | PyValue[] | Map<string, PyValue>;

/** A header that is not a literal of the supported subset; the .npy reader turns it into an InputError. */
export class LiteralError extends Error {}

/** Parses a Python literal of dicts, tuples, lists, strings, integers, True, False and None. */
export function parsePythonLiteral(text: string): PyValue {
  let p = 0;
  const maxDepth = 32;

  const skipSpace = (): void => {
    while (p < text.length && (text[p] === " " || text[p] === "\t" || text[p] === "\n" || text[p] === "\r")) p++;
  };
  const expect = (ch: string): void => {
    skipSpace();
    if (text[p] !== ch) throw new LiteralError(`expected '${ch}' at character ${p + 1}`);
    p++;
  };
  const value = (depth: number): PyValue => {
    if (depth > maxDepth) throw new LiteralError("nested too deeply");
    skipSpace();
    const c = text[p];
    if (c === "{") return dict(depth);
    if (c === "(") return sequence(")", depth, true);
    if (c === "[") return sequence("]", depth, false);
    if (c === "'" || c === '"') return string();
    if (c !== undefined && /[-+0-9]/.test(c)) return integer();
    for (const [word, result] of [
      ["True", true],
      ["False", false],
      ["None", null],
    ] as const) {
      if (text.startsWith(word, p) && !/[A-Za-z0-9_]/.test(text[p + word.length] ?? "")) {
        p += word.length;
        return result;
      }
    }
    throw new LiteralError(c === undefined ? "unexpected end of header" : `unexpected character '${c}' at character ${p + 1}`);
  };
  const dict = (depth: number): Map<string, PyValue> => {
    p++; // {
    const map = new Map<string, PyValue>();
    for (;;) {
      skipSpace();
      if (text[p] === "}") {
        p++;
        return map;
      }
      const key = value(depth + 1);
      if (typeof key !== "string") throw new LiteralError(`dict key at character ${p} is not a string`);
      if (map.has(key)) throw new LiteralError(`key '${key}' appears twice`);
      expect(":");
      map.set(key, value(depth + 1));
      skipSpace();
      if (text[p] === ",") p++;
      else if (text[p] !== "}") throw new LiteralError(`expected ',' or '}' at character ${p + 1}`);
    }
  };
  const sequence = (close: string, depth: number, isTuple: boolean): PyValue => {
    p++; // ( or [
    const items: PyValue[] = [];
    let sawComma = false;
    for (;;) {
      skipSpace();
      if (text[p] === close) {
        p++;
        // (x) is just x in Python; a one-element tuple is written (x,)
        if (isTuple && items.length === 1 && !sawComma) return items[0];
        return items;
      }
      items.push(value(depth + 1));
      skipSpace();
      if (text[p] === ",") {
        p++;
        sawComma = true;
      } else if (text[p] !== close) {
        throw new LiteralError(`expected ',' or '${close}' at character ${p + 1}`);
      }
    }
  };
  const string = (): string => {
    const quote = text[p++];
    let out = "";
    while (p < text.length && text[p] !== quote) {
      if (text[p] === "\\" || text[p] === "\n") throw new LiteralError(`unsupported escape or line break in a string at character ${p + 1}`);
      out += text[p++];
    }
    if (p >= text.length) throw new LiteralError("unterminated string");
    p++;
    return out;
  };
  const integer = (): number => {
    const start = p;
    if (text[p] === "-" || text[p] === "+") p++;
    const digitsStart = p;
    while (p < text.length && text[p] >= "0" && text[p] <= "9") p++;
    if (p === digitsStart || /[A-Za-z_.]/.test(text[p] ?? "")) throw new LiteralError(`malformed integer at character ${start + 1}`);
    return Number(text.slice(start, p));
  };

  const result = value(0);
  skipSpace();
  if (p !== text.length) throw new LiteralError(`unexpected text after the literal at character ${p + 1}`);
  return result;
}
