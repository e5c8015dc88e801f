// `select` applied to a participants table (src/io/selectParticipants.ts): which rows are kept,
// the reason given to the others, and the errors at `select.<column>`. The expected rows are
// written out by hand from the small invented table below.
import { describe, expect, it } from "vitest";
import { parseParticipants } from "../../../src/io/participants.js";
import { selectParticipants, selectionText, tableRows } from "../../../src/io/selectParticipants.js";
import { expectInputError } from "./inputErrorAssertions.js";

const TABLE = parseParticipants(
  [
    "participant_id\tgroup\tsite\tscore",
    "p1\tpatient\t1\t10",
    "p2\tcontrol\t1\tn/a",
    "p3\tpatient\t2\t12",
    "p4\tpatient\tn/a\t9",
    "p5\tcontrol\t1.0\tn/a",
  ].join("\n") + "\n",
  "participants.tsv",
);
const where = (key: string) => ({ file: "design.yaml", key });

describe("selectParticipants", () => {
  it("keeps every row without a selection", () => {
    expect(selectParticipants(TABLE, [], where)).toEqual({ rows: [0, 1, 2, 3, 4], notSelected: [] });
  });

  it("keeps the rows whose cell text is listed, in every column named; names each failing column of the others", () => {
    const selection = selectParticipants(
      TABLE,
      [
        { column: "group", values: ["patient"] },
        { column: "site", values: ["1"] },
      ],
      where,
    );
    expect(selection.rows).toEqual([0]);
    expect(selection.notSelected).toEqual([
      { row: 1, reason: "not selected (group: control)" },
      { row: 2, reason: "not selected (site: 2)" },
      { row: 3, reason: "not selected (site: missing)" },
      { row: 4, reason: "not selected (group: control; site: 1.0)" },
    ]);
  });

  it("compares numbers as text: 1 does not match 1.0; participant_id may be selected", () => {
    expect(selectParticipants(TABLE, [{ column: "site", values: ["1.0"] }], where).rows).toEqual([4]);
    expect(selectParticipants(TABLE, [{ column: "participant_id", values: ["p2", "p3"] }], where).rows).toEqual([1, 2]);
  });

  it("refuses an unknown column, a value no row holds and an empty subset, at the select key", () => {
    expectInputError(() => selectParticipants(TABLE, [{ column: "grop", values: ["patient"] }], where), { file: "design.yaml", key: "select.grop", hint: /did you mean 'group'/ });
    expectInputError(() => selectParticipants(TABLE, [{ column: "group", values: ["Patient"] }], where), { file: "design.yaml", key: "select.group", hint: /did you mean 'patient'/ });
    expectInputError(() => selectParticipants(TABLE, [{ column: "site", values: ["n/a"] }], where), { file: "design.yaml", key: "select.site" });
    expectInputError(
      () =>
        selectParticipants(
          TABLE,
          [
            { column: "group", values: ["control"] },
            { column: "site", values: ["2"] },
          ],
          where,
        ),
      { file: "design.yaml", key: "select", message: [/keeps no participant: no row of participants.tsv has group = control and site = 2/] },
    );
  });

  it("restricts a table to some rows, keeping lines; says a selection in words", () => {
    const view = tableRows(TABLE, [0, 2]);
    expect(view.ids).toEqual(["p1", "p3"]);
    expect(view.lines).toEqual([2, 4]);
    expect(view.columns.get("score")).toEqual(["10", "12"]);
    expect(selectionText([{ column: "site", values: ["north", "south"] }, { column: "group", values: ["patient"] }])).toBe("site = north or south and group = patient");
  });
});
