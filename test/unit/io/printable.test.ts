import { describe, expect, it } from "vitest";
import { printable } from "../../../src/io/printable.js";

describe("printable(text) escapes control characters for the terminal", () => {
  it("ESC, carriage return, NUL, DEL and C1 controls become \\xHH", () => {
    expect(printable("sub-\u001b[31m01")).toBe("sub-\\x1b[31m01");
    expect(printable("a\rb\u0000c\u007fd\u009be")).toBe("a\\x0db\\x00c\\x7fd\\x9be");
  });

  it("keeps line feeds and tabs (messages of several lines pass through) and any other text", () => {
    expect(printable("line 1\n\tline 2 — région 区域 😀")).toBe("line 1\n\tline 2 — région 区域 😀");
  });
});
