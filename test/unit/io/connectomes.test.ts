import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  loadConnectomes,
  resolveTemplate,
  type ConnectomeOptions,
  type ConnectomeSubject,
} from "../../../src/io/connectomes.js";
import { encodeNpy } from "../../../src/io/npy.js";
import { expectInputError } from "./inputErrorAssertions.js";

const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };

function subject(id: string, tableRow: number, extra: Record<string, string | null> = {}): ConnectomeSubject {
  return { id, tableRow, values: { participant_id: id, ...extra } };
}

function matrixText(rows: number[][], separator = "\t"): string {
  return rows.map((row) => row.join(separator)).join("\n") + "\n";
}

/** Symmetric test matrix with a_ij = base + 10·(min+1) + (max+1) off the diagonal and 1 on it. */
function labelledMatrix(n: number, base: number): number[][] {
  return Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j) => (i === j ? 1 : base + 10 * (Math.min(i, j) + 1) + Math.max(i, j) + 1)),
  );
}

/** Relative comparison with the tolerance stated; prints inputs, expected, actual, difference, tolerance. */
function expectClose(actual: number, expected: number, relativeTolerance: number, input: string): void {
  const difference = Math.abs(actual - expected);
  if (!(difference <= relativeTolerance * Math.abs(expected))) {
    throw new Error(
      `${input}: expected ${expected}, actual ${actual}, difference ${difference}, tolerance ${relativeTolerance} × |expected|`,
    );
  }
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-io-connectomes-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A fresh folder inside the test's temporary folder. */
function folder(name: string): string {
  const path = join(dir, name);
  mkdirSync(path, { recursive: true });
  return path;
}

describe("resolveTemplate", () => {
  const sub = subject("sub-fen07", 6, { session: "baseline", site: null });

  it("fills {participant_id} and other columns and resolves against baseDir", () => {
    expect(resolveTemplate("mats/{participant_id}_{session}.txt", sub, "/data/study")).toBe(
      "/data/study/mats/sub-fen07_baseline.txt",
    );
  });

  it("uses the subject's id for {participant_id} when the row's cells do not repeat it", () => {
    const bare: ConnectomeSubject = { id: "sub-x", tableRow: 0, values: {} };
    expect(resolveTemplate("{participant_id}.csv", bare, "/b")).toBe("/b/sub-x.csv");
  });

  it("keeps an absolute template absolute", () => {
    expect(resolveTemplate("/abs/{participant_id}.txt", sub, "/data")).toBe("/abs/sub-fen07.txt");
  });

  it("a column the table does not have is an InputError on the key 'connectomes'", () => {
    expectInputError(() => resolveTemplate("{visit}/{participant_id}.txt", sub, "/d"), {
      key: "connectomes",
      message: ["{visit}", "not a column", "session"],
    });
  });

  it("a missing (n/a) value is an InputError naming the participant", () => {
    expectInputError(() => resolveTemplate("{site}/{participant_id}.txt", sub, "/d"), {
      key: "connectomes",
      message: ["sub-fen07", "{site}"],
    });
  });

  it("an unclosed or empty placeholder is an InputError, and the key can be chosen", () => {
    expectInputError(() => resolveTemplate("{participant_id.txt", sub, "/d"), { key: "connectomes", message: ["'{'"] });
    expectInputError(() => resolveTemplate("a{}b", sub, "/d", "inputs.matrices"), { key: "inputs.matrices" });
  });
});

describe("loadConnectomes from text files", () => {
  it("stores each subject's upper triangle, row-major (i<j), edge-major (data[e·S + s])", () => {
    const base = folder("order");
    const subjects = [subject("s1", 0), subject("s2", 2)];
    writeFileSync(join(base, "s1.txt"), matrixText(labelledMatrix(4, 0)));
    writeFileSync(join(base, "s2.txt"), matrixText(labelledMatrix(4, 100), ","));
    const loaded = loadConnectomes({ kind: "template", template: "{participant_id}.txt", baseDir: base }, subjects, PLAIN);
    expect(loaded).toMatchObject({ regionCount: 4, edgeCount: 6, subjectCount: 2 });
    expect(loaded.files).toEqual([join(base, "s1.txt"), join(base, "s2.txt")]);
    // Edge order (0,1) (0,2) (0,3) (1,2) (1,3) (2,3); value 10(i+1) + (j+1) (+100 for s2); each edge's subjects together.
    expect(Array.from(loaded.data)).toEqual([12, 112, 13, 113, 14, 114, 23, 123, 24, 124, 34, 134]);
  });

  it("ignores the diagonal, even NaN or infinite", () => {
    const base = folder("diagonal");
    writeFileSync(join(base, "a.txt"), "NaN 0.5 0.25\n0.5 inf -0.5\n0.25 -0.5 -Infinity\n");
    const loaded = loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], PLAIN);
    expect(Array.from(loaded.data)).toEqual([0.5, 0.25, -0.5]);
  });

  it("a non-finite off-diagonal cell is an error naming file, line and column", () => {
    const base = folder("offdiag");
    const file = join(base, "a.txt");
    writeFileSync(file, "0 0.5 0.25\n0.5 0 nan\n0.25 -0.5 0\n");
    expectInputError(() => loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], PLAIN), {
      file,
      line: 2,
      column: 3,
      message: ["'nan'", "row 2, column 3"],
    });
  });

  it("accepts a_ij and a_ji that differ within the tolerance, keeping a_ij", () => {
    const base = folder("within");
    writeFileSync(join(base, "a.txt"), "1 0.3\n0.30000000001 1\n");
    const loaded = loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], {
      ...PLAIN,
      asymmetryTolerance: 1e-9,
    });
    expect(Array.from(loaded.data)).toEqual([0.3]);
  });

  it("scales the tolerance by max(1, |a_ij|, |a_ji|)", () => {
    const base = folder("scaled");
    writeFileSync(join(base, "a.txt"), "0 1000\n1000.0005 0\n");
    const options = { ...PLAIN, asymmetryTolerance: 1e-6 };
    expect(Array.from(loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], options).data)).toEqual([1000]);
    writeFileSync(join(base, "a.txt"), "0 1000\n1000.002 0\n");
    expectInputError(() => loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], options), {
      file: join(base, "a.txt"),
      line: 1,
      column: 2,
    });
  });

  it("an asymmetric matrix is an error naming the first offending cell, both values and the symmetrize hint", () => {
    const base = folder("asym");
    const file = join(base, "a.txt");
    writeFileSync(file, "\n1 0.2 0.3\n0.2 1 0.4\n0.3 0.45 1\n");
    expectInputError(() => loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], PLAIN), {
      file,
      line: 3,
      column: 3,
      message: ["not symmetric", "row 2, column 3 is 0.4", "row 3, column 2 is 0.45"],
      hint: "set `symmetrize: true` in the design to average the two triangles",
    });
  });

  it("with symmetrize the edge is (a_ij + a_ji) / 2", () => {
    const base = folder("sym");
    writeFileSync(join(base, "a.txt"), "1 0.2 0.3\n0.4 1 0.4\n0.5 0.5 1\n");
    const loaded = loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], {
      ...PLAIN,
      symmetrize: true,
    });
    expect(Array.from(loaded.data)).toEqual([(0.2 + 0.4) / 2, (0.3 + 0.5) / 2, (0.4 + 0.5) / 2]);
  });

  it("fisher-z maps each edge r to atanh(r) (reference: Fisher 1915, z = ½ ln((1+r)/(1−r)))", () => {
    const base = folder("fisher");
    writeFileSync(join(base, "a.txt"), "1 0.5 -0.9\n0.5 1 0\n-0.9 0 1\n");
    const loaded = loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], {
      ...PLAIN,
      transform: "fisher-z",
    });
    const rs = [0.5, -0.9, 0];
    rs.forEach((r, e) => {
      const reference = 0.5 * Math.log((1 + r) / (1 - r));
      if (r === 0) expect(loaded.data[e]).toBe(0);
      else expectClose(loaded.data[e], reference, 8 * Number.EPSILON, `fisher-z(${r})`);
    });
    // atanh(0.5) = ½ ln 3 exactly (closed form).
    expectClose(loaded.data[0], 0.5 * Math.log(3), 4 * Number.EPSILON, "fisher-z(0.5) vs ½ ln 3");
  });

  it("fisher-z on a correlation of ±1 off the diagonal is an error naming file, row, column and value", () => {
    const base = folder("fisher-bad");
    const file = join(base, "a.txt");
    writeFileSync(file, "1 0.5 1\n0.5 1 0\n1 0 1\n");
    expectInputError(
      () => loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], { ...PLAIN, transform: "fisher-z" }),
      { file, line: 1, column: 3, message: ["row 1, column 3", "is 1", "strictly between -1 and 1"] },
    );
  });

  it("a missing matrix file is an InputError naming the resolved path", () => {
    const base = folder("missing");
    writeFileSync(join(base, "s1.txt"), matrixText(labelledMatrix(3, 0)));
    expectInputError(
      () =>
        loadConnectomes({ kind: "template", template: "{participant_id}.txt", baseDir: base }, [subject("s1", 0), subject("s2", 1)], PLAIN),
      { file: join(base, "s2.txt"), message: ["cannot read", "no such file"], hint: /participant 's2'/ },
    );
  });

  it("matrices of different sizes are an error naming the differing file and both sizes", () => {
    const base = folder("sizes");
    writeFileSync(join(base, "s1.txt"), matrixText(labelledMatrix(3, 0)));
    writeFileSync(join(base, "s2.txt"), matrixText(labelledMatrix(4, 0)));
    expectInputError(
      () =>
        loadConnectomes({ kind: "template", template: "{participant_id}.txt", baseDir: base }, [subject("s1", 0), subject("s2", 1)], PLAIN),
      { file: join(base, "s2.txt"), line: 1, message: ["4 × 4", "3 × 3", join(base, "s1.txt")] },
    );
  });

  it("parse errors keep the matrix file's line and column", () => {
    const base = folder("parse");
    const file = join(base, "s1.txt");
    writeFileSync(file, "1 2\n2 x\n");
    expectInputError(() => loadConnectomes({ kind: "template", template: "s1.txt", baseDir: base }, [subject("s1", 0)], PLAIN), {
      file,
      line: 2,
      column: 2,
    });
  });

  it("a 1 × 1 matrix has no edges and is an error", () => {
    const base = folder("tiny");
    writeFileSync(join(base, "a.txt"), "1\n");
    expectInputError(() => loadConnectomes({ kind: "template", template: "a.txt", baseDir: base }, [subject("a", 0)], PLAIN), {
      file: join(base, "a.txt"),
      line: 1,
      message: ["at least 2 regions"],
    });
  });

  it("no subjects is an InputError on the key 'connectomes'", () => {
    expectInputError(() => loadConnectomes({ kind: "template", template: "a.txt", baseDir: dir }, [], PLAIN), { key: "connectomes" });
  });
});

describe("loadConnectomes from an .npy stack", () => {
  function writeStack(name: string, shape: number[], values: number[]): string {
    const path = join(folder("npy"), name);
    writeFileSync(path, encodeNpy(shape, new Float64Array(values)));
    return path;
  }
  const stackValues = [0, 1, 2].flatMap((k) => labelledMatrix(3, 100 * k).flat());

  it("selects the subjects' matrices by their participants-table row", () => {
    const path = writeStack("stack.npy", [3, 3, 3], stackValues);
    const loaded = loadConnectomes({ kind: "file", path }, [subject("c", 2), subject("a", 0)], { ...PLAIN, participantRowCount: 3 });
    expect(loaded).toMatchObject({ regionCount: 3, edgeCount: 3, subjectCount: 2, files: [resolve(path)] });
    expect(Array.from(loaded.data)).toEqual([212, 12, 213, 13, 223, 23]); // edge-major
  });

  it("a stack whose length differs from the participants table is an error naming file and shapes", () => {
    const path = writeStack("short.npy", [3, 3, 3], stackValues);
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0)], { ...PLAIN, participantRowCount: 4 }), {
      file: resolve(path),
      message: ["(3, 3, 3)", "4 rows", "(4, N, N)"],
    });
  });

  it("without the table's row count, every subject's row must be in the stack", () => {
    const path = writeStack("three.npy", [3, 3, 3], stackValues);
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("d", 3)], PLAIN), {
      file: resolve(path),
      message: ["'d'", "row 4", "(3, 3, 3)"],
    });
  });

  it("an array that is not (R, N, N) is an error naming its shape", () => {
    const path = writeStack("flat.npy", [3, 9], stackValues.slice(0, 27));
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0)], PLAIN), {
      file: resolve(path),
      message: ["(3, 9)"],
    });
    const notSquare = writeStack("rect.npy", [1, 2, 3], [0, 1, 2, 3, 4, 5]);
    expectInputError(() => loadConnectomes({ kind: "file", path: notSquare }, [subject("a", 0)], PLAIN), {
      file: resolve(notSquare),
      message: ["(1, 2, 3)"],
    });
  });

  it("asymmetry inside the stack names the file, the matrix, the participant and the cell", () => {
    const values = stackValues.slice();
    values[9 + 2 * 3 + 1] = 999; // matrix 2, row 3, column 2
    const path = writeStack("asym.npy", [3, 3, 3], values);
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0), subject("b", 1)], PLAIN), {
      file: resolve(path),
      message: ["matrix 2 of the stack", "participant 'b'", "row 2, column 3 is 123", "row 3, column 2 is 999"],
      hint: /symmetrize: true/,
    });
  });

  it("NaN on the diagonal is ignored; NaN off it is an error naming row and column", () => {
    const values = stackValues.slice();
    values[0] = NaN;
    values[4] = Infinity;
    const okPath = writeStack("diag.npy", [3, 3, 3], values);
    expect(Array.from(loadConnectomes({ kind: "file", path: okPath }, [subject("a", 0)], PLAIN).data)).toEqual([12, 13, 23]);
    values[3] = NaN; // row 2, column 1
    const badPath = writeStack("offdiag.npy", [3, 3, 3], values);
    expectInputError(() => loadConnectomes({ kind: "file", path: badPath }, [subject("a", 0)], PLAIN), {
      file: resolve(badPath),
      message: ["row 2, column 1", "NaN", "finite"],
    });
  });

  it("a missing stack file is an InputError naming it", () => {
    const path = join(dir, "nowhere.npy");
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0)], PLAIN), {
      file: path,
      message: ["cannot read"],
    });
  });
});
