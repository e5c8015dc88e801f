/**
 * Text for LaTeX (text mode, any engine): the ten special characters and the
 * ones the default OT1 font prints wrongly (< > |) become commands, a hyphen
 * before a digit after a non-word character becomes a minus sign, and the few
 * non-ASCII symbols plexus itself writes (± ≤ ≥ − – — α χ η Σ √ × ²) become
 * commands that need no package. Brackets are braced, so a cell that starts
 * with "[" is never read as the optional argument of the \\ before it. Other
 * non-ASCII text (e.g. accented labels) is kept as UTF-8, the default input
 * encoding of LaTeX since 2018.
 */
const COMMANDS: Record<string, string> = {
  "\\": "\\textbackslash{}",
  "{": "\\{",
  "}": "\\}",
  $: "\\$",
  "&": "\\&",
  "#": "\\#",
  "^": "\\textasciicircum{}",
  _: "\\_",
  "%": "\\%",
  "~": "\\textasciitilde{}",
  "<": "\\textless{}",
  ">": "\\textgreater{}",
  "|": "\\textbar{}",
  "[": "{[}",
  "]": "{]}",
  "±": "\\ensuremath{\\pm}",
  "≤": "\\ensuremath{\\leq}",
  "≥": "\\ensuremath{\\geq}",
  "−": "\\ensuremath{-}",
  "–": "--",
  "—": "---",
  "α": "\\ensuremath{\\alpha}",
  "χ": "\\ensuremath{\\chi}",
  "η": "\\ensuremath{\\eta}",
  "Σ": "\\ensuremath{\\Sigma}",
  "√": "\\ensuremath{\\surd}",
  "×": "\\ensuremath{\\times}",
  "²": "\\textsuperscript{2}",
};

export function escapeLatex(text: string): string {
  let out = "";
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === "-" && /\d/.test(text[i + 1] ?? "") && !/\w/.test(text[i - 1] ?? "")) {
      out += "\\ensuremath{-}";
    } else if (c === "\r" || c === "\n") {
      out += " ";
    } else {
      out += COMMANDS[c] ?? c;
    }
  }
  return out;
}
