/**
 * Text for a Markdown table cell or paragraph that still reads as plain text
 * (pasted into a word processor): only what CommonMark (with GitHub's tables
 * and strikethrough) would read as markup is backslash-escaped, and symbols
 * stay characters, never HTML entities.
 * - always: ` (code), $ (maths in many viewers), and | in a table cell;
 * - \ before ASCII punctuation or at the end; & that would spell an entity;
 * - < unless a space follows (so no tag, comment or autolink can start; "< 0.001" stays);
 * - * and ~ unless between spaces; _ unless between letters or digits (where it cannot start emphasis);
 * - ] before ( [ or : (no link, image or link definition);
 * - at the start of a paragraph (not in a cell): a heading, quote, list, rule or setext marker.
 * Line breaks become spaces (a table row is one line).
 */
export function escapeMarkdown(text: string, where: "paragraph" | "cell" = "paragraph"): string {
  const chars = [...text.replace(/[\r\n]+/g, " ")];
  const wordChar = (c: string | undefined) => c !== undefined && /[\p{L}\p{N}]/u.test(c);
  const space = (c: string | undefined) => c === undefined || /\s/u.test(c);
  const escaped = chars.map((c, k) => {
    const before = chars[k - 1];
    const after = chars[k + 1];
    let escape = false;
    if (c === "`" || c === "$") escape = true;
    else if (c === "|") escape = where === "cell";
    else if (c === "\\") escape = after === undefined || /[!-/:-@[-`{-~]/.test(after);
    else if (c === "&") escape = /^&(#[0-9]+|#[xX][0-9a-fA-F]+|[A-Za-z][A-Za-z0-9]*);/.test(chars.slice(k, k + 34).join(""));
    else if (c === "<") escape = !space(after);
    else if (c === "*" || c === "~") escape = !(space(before) && space(after));
    else if (c === "_") escape = !(wordChar(before) && wordChar(after));
    else if (c === "]") escape = after === "(" || after === "[" || after === ":";
    return escape ? `\\${c}` : c;
  });
  let result = escaped.join("");
  if (where === "paragraph") {
    // Block markers at the start of a line: # heading, > quote, - + * lists and rules, = setext underline, "1." "1)" ordered lists.
    // Leading spaces go (four would make a code block).
    result = result.replace(/^\s+/u, "");
    const start = result.match(/^([#>=]|[-+*](?=\s|$|[-+*])|\d{1,9}(?=[.)](\s|$)))/);
    if (start) {
      const at = /^\d/.test(start[1]) ? start[1].length : 0;
      result = `${result.slice(0, at)}\\${result.slice(at)}`;
    }
  }
  return result;
}
