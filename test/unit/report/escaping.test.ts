import { describe, expect, it } from "vitest";
import { parseTsv } from "../../../src/io/tsv.js";
import { formatTsv } from "../../../src/output/tsvWriter.js";
import { escapeHtml } from "../../../src/output/report/escapeHtml.js";
import { escapeLatex } from "../../../src/output/report/escapeLatex.js";
import { escapeMarkdown } from "../../../src/output/report/escapeMarkdown.js";
import { markdownTable } from "../../../src/output/report/tables/markdownTable.js";
import { tsvCellText } from "../../../src/output/report/tsvCellText.js";

// Expected strings follow the HTML Living Standard's character references, CommonMark's
// backslash escapes and LaTeX's ten special characters (Lamport 1994, LaTeX: A Document
// Preparation System, 2nd ed.; from memory); the exact spellings are this project's choice.
describe("escapeHtml", () => {
  it("escapeHtml('<script>alert(1)</script>') is inert text", () => {
    expect(escapeHtml("<script>alert(1)</script>")).toBe("&lt;script&gt;alert(1)&lt;/script&gt;");
  });
  it("escapeHtml escapes & \" ' for attribute values", () => {
    expect(escapeHtml(`a & "b" 'c'`)).toBe("a &amp; &quot;b&quot; &#39;c&#39;");
  });
});

describe("escapeMarkdown", () => {
  it("escapeMarkdown backslash-escapes a < that could start a tag (no character references) and escapes table pipes in a cell", () => {
    expect(escapeMarkdown("<b>x</b> | y", "cell")).toBe("\\<b>x\\</b> \\| y");
  });
  it("escapeMarkdown escapes emphasis, code and link characters and joins lines", () => {
    expect(escapeMarkdown("*a*_b_`c`[d](e)\nf")).toBe("\\*a\\*\\_b\\_\\`c\\`[d\\](e) f");
  });
  it("escapeMarkdown escapes $ so a viewer that renders $…$ as maths shows the text", () => {
    expect(escapeMarkdown("cost $5 to $10")).toBe("cost \\$5 to \\$10");
  });
  it("a tables.md table escapes $ in its title, headers, cells and notes", () => {
    const table = { id: "t", title: "Price $", columns: [{ header: "$a", align: "left" as const }], rows: [{ cells: ["x$y$"] }], notes: ["$n$"] };
    expect(markdownTable(table, 1)).toBe("**Table 1. Price \\$**\n\n| \\$a |\n| :--- |\n| x\\$y\\$ |\n\n\\$n\\$\n");
  });
});

describe("escapeLatex", () => {
  it("escapeLatex escapes the ten special characters", () => {
    expect(escapeLatex("\\{}$&#^_%~")).toBe("\\textbackslash{}\\{\\}\\$\\&\\#\\textasciicircum{}\\_\\%\\textasciitilde{}");
  });
  it("escapeLatex writes < > | as commands, braces brackets and makes a leading hyphen before a digit a minus", () => {
    expect(escapeLatex("<a|b> [c] -1.5 x-2")).toBe("\\textless{}a\\textbar{}b\\textgreater{} {[}c{]} \\ensuremath{-}1.5 x-2");
  });
  it("escapeLatex maps plexus's own symbols to package-free commands and keeps other UTF-8", () => {
    expect(escapeLatex("± ≤ χ² – é")).toBe("\\ensuremath{\\pm} \\ensuremath{\\leq} \\ensuremath{\\chi}\\textsuperscript{2} -- é");
  });
});

describe("tsvCellText reads back what formatTsv (src/output/tsvWriter.ts) protected", () => {
  const values = ["=1+2", "+cmd", "-x", "@SUM(A1)", '=HYPERLINK("x")', "plain", "-1.5", "a\"b", "it's"];
  it("formatTsv then parseTsv then tsvCellText gives the original text back", () => {
    const text = formatTsv(["value"], values.map((v) => [v]));
    const table = parseTsv(text, "roundtrip.tsv");
    expect(table.rows.map((row) => tsvCellText(row[0]))).toEqual(values);
  });
  it("tsvCellText leaves a plain number with a sign alone", () => {
    expect(tsvCellText("-1.5")).toBe("-1.5");
    expect(tsvCellText("'-1.5")).toBe("'-1.5");
  });
});
