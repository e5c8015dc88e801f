// Input safety through the CLI: `main(argv, sink)` in-process on tiny cohorts written from inline
// strings. Each case is a user mistake that must end in exit 2 with a located message (file:line
// and column, or the design key), no stack trace and no temporary path, or a data choice that
// must be honoured (missing-value codes, listwise deletion).
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli } from "../unit/strength/strengthTestFiles.js";

let root = "";
beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-inputs-"));
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});


const REGIONS = 4;

/** A 4-region symmetric matrix whose upper-triangle values depend on the subject number. */
function matrixText(s: number): string {
  const m: number[][] = Array.from({ length: REGIONS }, () => new Array<number>(REGIONS).fill(0));
  let e = 0;
  for (let i = 0; i < REGIONS; i++) {
    for (let j = i + 1; j < REGIONS; j++, e++) {
      const v = Math.round(1000 * Math.sin(1 + 7 * s + 3 * e * e + s * e)) / 1000;
      m[i][j] = v;
      m[j][i] = v;
    }
  }
  return `${m.map((row) => row.join("\t")).join("\n")}\n`;
}

/**
 * Writes a study folder: participants.tsv from `table` (tab-separated lines, header first),
 * one matrix per subject (connectomes/<participant_id>.tsv, for plain IDs), and design.yaml.
 * Returns the design file's path.
 */
function study(name: string, table: string[], design: string[]): string {
  const dir = path.join(root, name);
  mkdirSync(path.join(dir, "connectomes"), { recursive: true });
  writeFileSync(path.join(dir, "participants.tsv"), `${table.join("\n")}\n`);
  table.slice(1).forEach((line, s) => {
    const id = line.split("\t")[0];
    if (/^[A-Za-z0-9_-]+$/.test(id)) writeFileSync(path.join(dir, "connectomes", `${id}.tsv`), matrixText(s));
  });
  const file = path.join(dir, "design.yaml");
  writeFileSync(file, `${design.join("\n")}\n`);
  return file;
}

const HEAD = ["subjects: participants.tsv", "connectomes: connectomes/{participant_id}.tsv"];

/** Twelve subjects: group, age, site; `age` cells as given (default: numbers). */
function table(ages?: string[]): string[] {
  const rows = ["participant_id\tgroup\tage\tsite"];
  for (let s = 0; s < 12; s++) {
    rows.push(`sub-${String(s + 1).padStart(2, "0")}\t${s % 2 ? "patient" : "control"}\t${ages?.[s] ?? String(20 + ((s * 7) % 23))}\t${["a", "b", "c"][s % 3]}`);
  }
  return rows;
}

/** Exit 2, the message located, no stack trace, no path of a temporary folder plexus made. */
function expectUserError(result: { code: number; stderr: string }, ...patterns: (string | RegExp)[]): void {
  expect(result.code, result.stderr).toBe(2);
  expect(result.stderr).toMatch(/^plexus: error: /);
  expect(result.stderr).not.toMatch(/\n\s+at /);
  expect(result.stderr).not.toMatch(/staging|\.plexus-|checkpoint/);
  for (const pattern of patterns) expect(result.stderr).toMatch(pattern);
}

describe("missing-value codes", () => {
  it("an NA age is missing (listwise deletion with a warning naming the subject), not a factor level", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[3] = "NA";
    const design = study("na-age", table(ages), [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/columns     intercept, group\[patient\], age\n/);
    expect(result.stdout).toMatch(/df          8\n/); // 11 subjects, 3 columns
    expect(result.stdout).toMatch(/subjects    11 used of 12 \(1 left out for missing values\)/);
    expect(result.stderr).toMatch(/warning: 1 participant left out for missing values: sub-04 \(missing age\)/);
  });

  it("every default code (empty, n/a, N/A, NA, NaN, nan) is missing", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ["", "n/a", "N/A", "NA", "NaN", "nan"].forEach((code, k) => (ages[k] = code));
    const design = study("all-codes", table(ages), [...HEAD, "model: age", "contrasts:", "  up: age"]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/subjects    6 used of 12 \(6 left out for missing values\)/);
  });

  it("missing_values replaces the codes: -999 is missing, and NA (no longer a code) is a stray non-number", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[0] = "-999";
    const ok = study("custom-codes", table(ages), [...HEAD, 'missing_values: ["-999"]', "model: age", "contrasts:", "  up: age"]);
    const result = await runCli(["check", ok]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/11 used of 12/);
    ages[1] = "NA";
    const bad = study("custom-codes-na", table(ages), [...HEAD, 'missing_values: ["-999"]', "model: age", "contrasts:", "  up: age"]);
    expectUserError(await runCli(["check", bad]), /participants\.tsv:3:3: 1 cell of the numeric model column 'age' is not a finite number/);
  });
});

describe("a numeric column with a few non-numbers", () => {
  it("is an error listing every such cell as file:line:column, with the ways out", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[2] = "unknown";
    ages[6] = "6O";
    const design = study("stray", table(ages), [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["run", design, "--out", path.join(root, "stray-out")]);
    expectUserError(
      result,
      /participants\.tsv:4:3: 2 cells of the numeric model column 'age' are not a finite number:/,
      /participants\.tsv:4:3 age 'unknown'/,
      /participants\.tsv:8:3 age '6O'/,
      /add their text to `missing_values:`/,
      /list the column under `levels:`/,
    );
  });

  it("lists at most 10 cells and counts the rest", async () => {
    const ages = table().slice(1).map((r, s) => (s < 11 ? `x${s}` : "30"));
    const design = study("stray-many", table(ages), [...HEAD, "model: age", "contrasts:", "  up: age"]);
    const result = await runCli(["check", design]);
    expectUserError(result, /11 cells of the numeric model column 'age'/, /'x9'/, /… and 1 more/);
    expect(result.stderr).not.toMatch(/'x10'/);
  });

  it("is a factor by choice when listed under levels:", async () => {
    const ages = table().slice(1).map((r, s) => (s % 2 ? "young" : "1"));
    const design = study("levels-choice", table(ages), [...HEAD, "model: age", "levels:", "  age: ['1', young]", "contrasts:", "  up: age[young]"]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/columns     intercept, age\[young\]/);
  });

  it("a column with no number at all is a text factor", async () => {
    const design = study("text-factor", table(), [...HEAD, "model: site", "contrasts:", "  b: site[b] - site[a]"]);
    expect((await runCli(["check", design])).code).toBe(0);
  });
});

describe("numbers that are not finite", () => {
  it("an age of 1e400, Infinity or -inf is an error naming file:line:column", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[1] = "1e400";
    ages[4] = "Infinity";
    ages[5] = "-inf";
    const design = study("overflow", table(ages), [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    expectUserError(
      await runCli(["check", design]),
      /participants\.tsv:3:3: 3 cells/,
      /participants\.tsv:3:3 age '1e400' \(not a finite number\)/,
      /participants\.tsv:6:3 age 'Infinity'/,
      /participants\.tsv:7:3 age '-inf'/,
    );
  });
});

describe("values put into path templates", () => {
  it("an ID with a path separator or '..' is an error naming the participants file line; the file outside is never read", async () => {
    const rows = table();
    rows[2] = rows[2].replace(/^sub-02/, "../outside/victim");
    rows[5] = rows[5].replace(/^sub-05/, "..");
    rows[7] = rows[7].replace(/^sub-07/, "a\\b");
    const design = study("traversal", rows, [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const outside = path.join(root, "traversal", "outside");
    mkdirSync(outside);
    writeFileSync(path.join(outside, "victim.tsv"), matrixText(99));
    const result = await runCli(["check", design]);
    expectUserError(
      result,
      /participants\.tsv:3:1: 3 values of the participants table cannot be put into the path template/,
      /participants\.tsv:3:1 participant_id '\.\.\/outside\/victim' has a path separator/,
      /participants\.tsv:6:1 participant_id '\.\.' is '\.\.'/,
      /participants\.tsv:8:1 participant_id 'a\\b' has a path separator/,
    );
  });

  it("any column used in the template is checked, with its column number", async () => {
    const rows = table().map((r, k) => (k === 3 ? r.replace(/\tc$/, "\t../c") : r));
    const design = study("site-template", rows, ["subjects: participants.tsv", "connectomes: connectomes/{participant_id}.tsv#{site}", "model: group", "contrasts:", "  up: group[patient] - group[control]"]);
    expectUserError(await runCli(["check", design]), /participants\.tsv:4:4 site '\.\.\/c' has a path separator/);
  });

  it("an ID with control characters is refused for the path, and printed escaped", async () => {
    const rows = table();
    rows[3] = rows[3].replace(/^sub-03/, "sub-\u001b[2J03");
    const design = study("escape-id", rows, [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expectUserError(result, /participants\.tsv:4:1 participant_id 'sub-\\x1b\[2J03' has a control character/);
    expect(result.stderr).not.toContain("\u001b");
  });

  it("an ID with control characters is refused even when its row is left out, and printed escaped", async () => {
    const rows = table();
    rows[3] = rows[3].replace(/^sub-03(\t\w+\t)\d+/, "sub-\u001b[31m03$1NA");
    const design = study("escape-warning", rows, [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expectUserError(result, /participants\.tsv:4:1: participant_id 'sub-\\x1b\[31m03' has a control character/);
    expect(result.stderr).not.toContain("\u001b");
  });
});

describe("design errors found in preparation (plexus check), before any checkpoint", () => {
  const base = [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"];

  it("blocks: participant_id (every block one subject) is an error at inference.blocks from check", async () => {
    const design = study("blocks-id", table(), [...base, "inference:", "  permutations: 99", "  blocks: participant_id"]);
    const checked = await runCli(["check", design]);
    expectUserError(checked, /key 'inference.blocks'/);
    const out = path.join(root, "blocks-id-out");
    const run = await runCli(["run", design, "--out", out]);
    expectUserError(run, /key 'inference.blocks'/);
    expect(run.stderr).not.toMatch(/subjects\.tsv/);
  });

  it("a blocks column with one subject per block allows no permutation: an error at inference.blocks from check", async () => {
    const rows = table().map((r, k) => (k === 0 ? `${r}\tscan` : `${r}\tscan-${k}`));
    const design = study("blocks-unique", rows, [...base, "inference:", "  permutations: 99", "  blocks: scan"]);
    expectUserError(await runCli(["check", design]), /key 'inference.blocks'/, /the only permutation for 'up' is the identity/);
  });

  it("scheme: permute on a contrast of the constant term is found by check, at the contrast's key", async () => {
    const design = study("permute-constant", table(), [...HEAD, "model: 1", "contrasts:", "  mean: intercept", "inference:", "  permutations: 99", "  scheme: permute"]);
    expectUserError(await runCli(["check", design]), /design\.yaml:5, key 'contrasts.mean'/, /permuting rows cannot change/);
  });

  it("block_permutation: whole with blocks of unequal size is an error at inference.block_permutation from check", async () => {
    const rows = table().map((r, k) => (k === 0 ? `${r}\tfamily` : `${r}\t${k <= 5 ? "f1" : k <= 9 ? "f2" : "f3"}`));
    const design = study("whole-unequal", rows, [...base, "inference:", "  permutations: 99", "  blocks: family", "  block_permutation: whole"]);
    expectUserError(await runCli(["check", design]), /key 'inference.block_permutation'/, /equal size/);
  });
});

describe("bounded work", () => {
  it("an enhancement step giving over 10,000 levels is an error at its key, from check, before any checkpoint", async () => {
    const design = study("tiny-step", table(), [
      ...HEAD,
      "model: group + age",
      "contrasts:",
      "  up: group[patient] - group[control]",
      "inference:",
      "  method: threshold-free",
      "  permutations: 99",
      "  enhancement:",
      "    step: 1.0e-9",
    ]);
    expectUserError(await runCli(["check", design]), /design\.yaml:10, key 'inference.enhancement.step'/, /more than the limit of 10,000/);
    const out = path.join(root, "tiny-step-out");
    const result = await runCli(["run", design, "--out", out, "--quiet"]);
    expectUserError(result, /design\.yaml:10, key 'inference.enhancement.step'/, /more than the limit of 10,000/, /use a step of at least/);
    expect(result.stderr).not.toMatch(/relabelings/);
    expect(readdirSync(root).filter((name) => name.includes("tiny-step-out"))).toEqual([]); // no checkpoint, no results folder
  });
});

describe("model formulas and contrasts through the CLI", () => {
  it("model: y ~ group is an error at the model key and line", async () => {
    const design = study("tilde", table(), [...HEAD, "model: y ~ group", "contrasts:", "  up: group[patient] - group[control]"]);
    expectUserError(await runCli(["check", design]), /design\.yaml:3, key 'model'/, /has a '~'/, /`model: group`/);
  });

  it("a contrast 1e400*age is an error at its key", async () => {
    const design = study("contrast-overflow", table(), [...HEAD, "model: group + age", "contrasts:", "  big: 1e400*age"]);
    expectUserError(await runCli(["check", design]), /design\.yaml:5, key 'contrasts.big'/, /not a finite number/);
  });

  it("f: group (a two-level factor alone) is accepted as its t contrast, with a note", async () => {
    const design = study("f-group", table(), [...HEAD, "model: group + age", "contrasts:", "  f: group"]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/contrast    f: group  ->  \[0, 1, 0\]/);
    expect(result.stderr).toMatch(/tested as the t contrast group\[patient\]/);
  });
});

/** `table()` with a `sex` column whose cells are given (default F/M alternating). */
function tableWithSex(sex: (string | undefined)[]): string[] {
  return table().map((row, k) => (k === 0 ? `${row}\tsex` : `${row}\t${sex[k - 1] ?? (k % 3 ? "F" : "M")}`));
}

describe("a custom missing_values list", () => {
  it("an empty cell is still missing, and a default code left out of the list is a level with a warning naming it", async () => {
    const sex: (string | undefined)[] = [];
    sex[2] = "";
    sex[5] = "n/a";
    sex[8] = "n/a";
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[0] = "-999";
    const design = study("custom-codes-factor", tableWithSex(sex).map((r, k) => (k === 1 ? r.replace(/\t\d+\t/, "\t-999\t") : r)), [
      ...HEAD,
      'missing_values: ["-999"]',
      "model: group + age + sex",
      "contrasts:",
      "  up: group[patient] - group[control]",
    ]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/columns     intercept, group\[patient\], age, sex\[M\], sex\[n\/a\]\n/);
    expect(result.stdout).toMatch(/subjects    10 used of 12 \(2 left out for missing values\)/);
    expect(result.stderr).toMatch(/sub-03 \(missing sex\)/);
    expect(result.stderr).toMatch(
      /warning: 'sex' has the level 'n\/a' in 2 subjects \(\S*participants\.tsv lines 7, 10\): 'n\/a' is a missing-value code by default, but this design's missing_values leaves it out, so it is treated as a level; add "n\/a" to missing_values to make these cells missing/,
    );
  });

  it("numbers and a bare scalar are accepted: missing_values: [-999, NA]", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[0] = "-999";
    ages[1] = "NA";
    const design = study("numeric-codes", table(ages), [...HEAD, "missing_values: [-999, NA]", "model: age", "contrasts:", "  up: age"]);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/10 used of 12/);
    const scalar = study("scalar-code", table(ages), [...HEAD, "missing_values: -999", "model: age", "contrasts:", "  up: age"]);
    expectUserError(await runCli(["check", scalar]), /participants\.tsv:3:3: 1 cell of the numeric model column 'age' is not a finite number/);
  });
});

describe("every problem of the participants table in one pass", () => {
  it("repeated IDs, a stray non-number and a level not under levels: are reported together, in line order", async () => {
    const rows = table();
    rows[5] = rows[5].replace(/^sub-05/, "sub-02");
    rows[9] = rows[9].replace(/^sub-09/, "sub-02");
    rows[10] = rows[10].replace(/\t\d+\t/, "\tunknown\t");
    rows[11] = rows[11].replace(/^(sub-11\t)\w+/, "$1patiant");
    const design = study("all-at-once", rows, [...HEAD, "model: group + age", "levels:", "  group: [control, patient]", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expectUserError(
      result,
      /participants\.tsv:6:1: duplicate participant_id 'sub-02' on lines 3 and 6\n/,
      /participants\.tsv:10:1: duplicate participant_id 'sub-02' on lines 3 and 10\n/,
      /participants\.tsv:11:3: 1 cell of the numeric model column 'age' is not a finite number:\n\s+\S+participants\.tsv:11:3 age 'unknown'/,
      /participants\.tsv:12:2: 'group' has the value 'patiant', which is not among the levels given in the design \(control, patient\)/,
      /\(4 problems in all\)/,
    );
  });

  it("every cell of a factor outside its levels: is listed, with its line and column", async () => {
    const rows = table().map((r, k) => (k === 2 || k === 7 ? r.replace(/\tpatient\t/, "\tpatiant\t").replace(/\tcontrol\t/, "\tcontrl\t") : r));
    const design = study("levels-all", rows, [...HEAD, "model: group", "levels:", "  group: [control, patient]", "contrasts:", "  up: group[patient] - group[control]"]);
    expectUserError(
      await runCli(["check", design]),
      /participants\.tsv:3:2: 'group' has the value 'patiant'/,
      /participants\.tsv:8:2: 'group' has the value 'contrl'/,
      /\(2 problems in all\)/,
    );
  });
});

describe("numbers too large for the model", () => {
  it("an age of 1e200 or -1e300 is an error listing the cells and the limit, not a rank message", async () => {
    const ages = table().slice(1).map((r) => r.split("\t")[2]);
    ages[3] = "1e200";
    ages[7] = "-1e300";
    const design = study("huge", table(ages), [...HEAD, "model: group + age", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expectUserError(
      result,
      /participants\.tsv:5:3: 2 cells of the numeric model column 'age' are too large for the model \(magnitude 1e150 or more: its square would overflow double precision\):/,
      /participants\.tsv:5:3 age '1e200'/,
      /participants\.tsv:9:3 age '-1e300'/,
    );
    expect(result.stderr).not.toMatch(/rank/);
  });
});

describe("control characters never reach the outputs", () => {
  it("a factor level with a control character is refused at file:line:column, printed escaped", async () => {
    const rows = table().map((r, k) => (k === 4 ? r.replace(/\t[abc]$/, "\tb\u001b[2J") : r));
    const design = study("escape-level", rows, [...HEAD, "model: group + site", "contrasts:", "  up: group[patient] - group[control]"]);
    const result = await runCli(["check", design]);
    expectUserError(result, /participants\.tsv:5:4: site 'b\\x1b\[2J' has a control character/);
    expect(result.stderr).not.toContain("\u001b");
  });

  it("a blocks label with a control character is refused, even in a column of numbers", async () => {
    const rows = table().map((r, k) => (k === 0 ? `${r}\tfamily` : `${r}\t${k === 6 ? "3\u001b[0m" : String(1 + (k % 4))}`));
    const design = study("escape-block", rows, [...HEAD, "model: group", "contrasts:", "  up: group[patient] - group[control]", "inference:", "  permutations: 99", "  blocks: family"]);
    expectUserError(await runCli(["check", design]), /participants\.tsv:7:5: family '3\\x1b\[0m' has a control character/);
  });

  it("a region label with a control character is refused at file:line:column", async () => {
    const design = study("escape-region", table(), [...HEAD, "regions: regions.tsv", "model: group", "contrasts:", "  up: group[patient] - group[control]"]);
    writeFileSync(path.join(path.dirname(design), "regions.tsv"), "label\tsystem\nr1\tvis\nr\u001b]0;x\u0007\tvis\nr3\tdm\u0085\nr4\tdm\n");
    const result = await runCli(["check", design]);
    expectUserError(result, /regions\.tsv:3:1: label 'r\\x1b\]0;x\\x07' has a control character/, /regions\.tsv:4:2: system 'dm\\x85' has a control character/);
    expect(result.stderr).not.toMatch(/[\u001b\u0007\u0085]/);
  });
});
