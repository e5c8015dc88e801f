/**
 * Text for a Markdown table cell or paragraph: the characters Markdown gives a
 * meaning to (CommonMark's ASCII punctuation that can start emphasis, code,
 * links or tables, and `$`, which many viewers read as the start of maths) are
 * backslash-escaped, and < > & become HTML character
 * references, so a label that looks like HTML is shown as text, never run.
 * Line breaks become spaces (a table row is one line).
 */
export function escapeMarkdown(text: string): string {
  return text
    .replace(/[\r\n]+/g, " ")
    .replace(/[\\`*_[\]{}|#~!$]/g, (c) => `\\${c}`)
    .replace(/[&<>]/g, (c) => (c === "&" ? "&amp;" : c === "<" ? "&lt;" : "&gt;"));
}
