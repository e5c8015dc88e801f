// The design file reader (src/io/designFile.ts): every key, the defaults, and every bad input
// as an InputError naming the file, the line and the key. YAML behaviour follows the YAML 1.2
// specification (yaml.org/spec/1.2.2, core schema, §10.3): `no`, `yes`, `on`, `off` are
// strings there (they were booleans in YAML 1.1), and only the core tags resolve.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { DEFAULT_INFERENCE, designKeyLocation, parseDesign, readDesign } from "../../../src/io/designFile.js";
import { expectInputError, resultOrInputError } from "./inputErrorAssertions.js";

const FILE = "study.yaml";

/** A minimal valid design: lines 1-5. */
const BASE = [
  "subjects: participants.tsv",
  "connectomes: conn/{participant_id}.tsv",
  "model: group + age",
  "contrasts:",
  "  up: group[patient] - group[control]",
  "",
].join("\n");

const withBase = (...lines: string[]) => BASE + lines.join("\n") + "\n";

describe("parseDesign: a minimal design and the defaults", () => {
  it("reads the required keys and fills every default", () => {
    const design = parseDesign(BASE, FILE);
    expect(design.file).toBe(FILE);
    expect(design.baseDir).toBe(path.dirname(path.resolve(FILE)));
    expect(design.subjects).toBe("participants.tsv");
    expect(design.connectomes).toBe("conn/{participant_id}.tsv");
    expect(design.regions).toBeUndefined();
    expect(design.model).toBe("group + age");
    expect(design.levels).toEqual({});
    expect(design.missingValues).toEqual(["", "n/a", "N/A", "NA", "NaN", "nan"]);
    expect(design.center).toEqual([]);
    expect(design.contrasts).toEqual([{ name: "up", expression: "group[patient] - group[control]", key: "contrasts.up", line: 5 }]);
    expect(design.transform).toBe("none");
    expect(design.symmetrize).toBe(false);
    expect(design.asymmetryTolerance).toBe(1e-6);
    expect(design.inference).toEqual(DEFAULT_INFERENCE);
    expect(design.inference.blocks).toBeUndefined();
  });

  it("the defaults are components, threshold 3, extent, 5000 permutations, seed 1, alpha 0.05, within, upper, bh, auto", () => {
    expect(DEFAULT_INFERENCE).toEqual({
      method: "components",
      thresholds: [3],
      enhancement: { extentExponent: 0.5, heightExponent: 2, step: 0.1 },
      size: "extent",
      permutations: 5000,
      seed: 1,
      alpha: 0.05,
      blockPermutation: "within",
      tail: "upper",
      fdr: "bh",
      scheme: "auto",
      acrossContrasts: false,
    });
  });

  it("records the line of every key path", () => {
    const design = parseDesign(withBase("inference:", "  threshold: 2.5"), FILE);
    expect(Object.fromEntries(design.lines)).toEqual({
      subjects: 1,
      connectomes: 2,
      model: 3,
      contrasts: 4,
      "contrasts.up": 5,
      inference: 6,
      "inference.threshold": 7,
    });
    expect(designKeyLocation(design, "inference.threshold")).toEqual({ file: FILE, key: "inference.threshold", line: 7 });
  });

  it("tolerates a byte-order mark", () => {
    expect(parseDesign("\uFEFF" + BASE, FILE).subjects).toBe("participants.tsv");
  });
});

describe("parseDesign: every key set", () => {
  const full = [
    "subjects: data/participants.tsv",
    "connectomes: data/{participant_id}_conn.tsv",
    "regions: data/regions.tsv",
    "model: group * age + sex",
    "levels:",
    "  group: [control, patient]",
    "  site: [1, 2, 3]",
    "center: age",
    "contrasts:",
    "  patient_gt_control: group[patient] - group[control]",
    "  slope: [0, 0, 1, 0, 0]",
    "  v2.up-1: age",
    "transform: fisher-z",
    "symmetrize: true",
    "asymmetry_tolerance: 0.001",
    "inference:",
    "  method: max-t",
    "  threshold: 2.5",
    "  size: mass",
    "  permutations: 100",
    "  seed: 7",
    "  alpha: 0.01",
    "  blocks: site",
    "  block_permutation: whole",
    "  tail: both",
    "  fdr: by",
    "  scheme: sign-flip",
    "",
  ].join("\n");

  it("reads each value", () => {
    const design = parseDesign(full, FILE);
    expect(design.subjects).toBe("data/participants.tsv");
    expect(design.connectomes).toBe("data/{participant_id}_conn.tsv");
    expect(design.regions).toBe("data/regions.tsv");
    expect(design.model).toBe("group * age + sex");
    // Numeric levels are kept as text, the way the participants table holds them.
    expect(design.levels).toEqual({ group: ["control", "patient"], site: ["1", "2", "3"] });
    expect(design.center).toEqual(["age"]);
    expect(design.contrasts).toEqual([
      { name: "patient_gt_control", expression: "group[patient] - group[control]", key: "contrasts.patient_gt_control", line: 10 },
      { name: "slope", expression: [0, 0, 1, 0, 0], key: "contrasts.slope", line: 11 },
      { name: "v2.up-1", expression: "age", key: "contrasts.v2.up-1", line: 12 },
    ]);
    expect(design.transform).toBe("fisher-z");
    expect(design.symmetrize).toBe(true);
    expect(design.asymmetryTolerance).toBe(0.001);
    expect(design.inference).toEqual({
      method: "max-t",
      thresholds: [2.5],
      enhancement: { extentExponent: 0.5, heightExponent: 2, step: 0.1 },
      size: "mass",
      permutations: 100,
      seed: 7,
      alpha: 0.01,
      blocks: "site",
      blockPermutation: "whole",
      tail: "both",
      fdr: "by",
      scheme: "sign-flip",
      acrossContrasts: false,
    });
    expect(design.lines.get("inference.scheme")).toBe(27);
  });

  it("inference.across_contrasts: true or false (a YAML null is the default, false); anything else names the key", () => {
    expect(parseDesign(withBase("inference:", "  across_contrasts: true"), FILE).inference.acrossContrasts).toBe(true);
    expect(parseDesign(withBase("inference:", "  across_contrasts: false"), FILE).inference.acrossContrasts).toBe(false);
    expect(parseDesign(withBase("inference:", "  across_contrasts: ~"), FILE).inference.acrossContrasts).toBe(false);
    for (const value of ["1", "yes please", "[true]", "'true'"]) {
      expect(() => parseDesign(withBase("inference:", `  across_contrasts: ${value}`), FILE), value).toThrow(/'inference.across_contrasts' must be true or false/);
    }
  });

  it("center also takes a list; model may be the number 1; a contrast may be a number", () => {
    expect(parseDesign(withBase("center: [age, score]"), FILE).center).toEqual(["age", "score"]);
    const oneSample = parseDesign("subjects: p.tsv\nconnectomes: c/{participant_id}.tsv\nmodel: 1\ncontrasts:\n  mean: [1]\n  m2: 1\n", FILE);
    expect(oneSample.model).toBe("1");
    expect(oneSample.contrasts.map((c) => c.expression)).toEqual([[1], "1"]);
  });

  it("each inference choice accepts each of its values", () => {
    const choices: Record<string, [string, string[]]> = {
      method: ["method", ["components", "fdr", "max-t", "threshold-free"]],
      size: ["size", ["extent", "mass"]],
      tail: ["tail", ["upper", "lower", "both"]],
      fdr: ["fdr", ["bh", "by"]],
      scheme: ["scheme", ["auto", "permute", "sign-flip"]],
      block_permutation: ["blockPermutation", ["within", "whole"]],
    };
    for (const [key, [field, values]] of Object.entries(choices)) {
      for (const value of values) {
        const design = parseDesign(withBase("inference:", `  ${key}: ${value}`), FILE);
        expect((design.inference as unknown as Record<string, unknown>)[field]).toBe(value);
      }
    }
  });
});

describe("parseDesign: threshold sweeps and enhancement parameters", () => {
  it("a list of thresholds is a sweep; the first is the primary threshold", () => {
    const design = parseDesign(withBase("inference:", "  threshold: [2.5, 3.0, 3.5]"), FILE);
    expect(design.inference.thresholds).toEqual([2.5, 3, 3.5]);
    expect(design.inference.thresholds[0]).toBe(2.5); // the primary threshold is the first
  });

  it("refuses an empty, repeated or non-positive list of thresholds", () => {
    for (const list of ["[]", "[3, 3]", "[2, -1]", "[2, x]"]) {
      expect(() => parseDesign(withBase("inference:", `  threshold: ${list}`), FILE)).toThrow(/threshold/);
    }
  });

  it("reads enhancement parameters and names an unknown one", () => {
    const design = parseDesign(withBase("inference:", "  enhancement:", "    extent_exponent: 0.4", "    height_exponent: 3", "    step: 0.05"), FILE);
    expect(design.inference.enhancement).toEqual({ extentExponent: 0.4, heightExponent: 3, step: 0.05 });
    expect(() => parseDesign(withBase("inference:", "  enhancement:", "    steps: 0.1"), FILE)).toThrow(/unknown key 'inference.enhancement.steps'/);
  });
});

describe("parseDesign: YAML 1.2 core schema", () => {
  it("`levels: {answer: [no, yes]}` stays the strings 'no' and 'yes' (booleans only in YAML 1.1)", () => {
    expect(parseDesign(withBase("levels:", "  answer: [no, yes]"), FILE).levels).toEqual({ answer: ["no", "yes"] });
    expect(parseDesign(withBase("levels: {answer: [off, on, y, n]}"), FILE).levels).toEqual({ answer: ["off", "on", "y", "n"] });
  });

  it("a contrast named `no` keeps its name", () => {
    const design = parseDesign("subjects: a\nconnectomes: c\nmodel: x\ncontrasts:\n  no: x\n", FILE);
    expect(design.contrasts[0].name).toBe("no");
  });

  it("`symmetrize: yes` is not a boolean in YAML 1.2: InputError at the key", () => {
    expectInputError(() => parseDesign(withBase("symmetrize: yes"), FILE), {
      file: FILE,
      key: "symmetrize",
      line: 6,
      message: [/true or false/],
    });
  });

  it("core tags are fine (!!str)", () => {
    expect(parseDesign(withBase("transform: !!str none"), FILE).transform).toBe("none");
  });

  const tagged: Array<[string, number]> = [
    ["transform: !custom none", 6],
    ["subjects2: !env HOME", 6],
    ["transform: !!js/function 'x'", 6],
    ["transform: !<tag:example.com,2000:x> none", 6],
    ["inference:\n  seed: !!float 3", 7],
    ["levels:\n  group: !weird [a, b]", 7],
    // YAML 1.1 types outside the 1.2 core schema.
    ["transform: !!binary aGVsbG8=", 6],
    ["transform: !!set {a, b}", 6],
    ["levels: !!omap\n  - group: [patient, control]", 6],
    ["transform: !!timestamp 2001-12-14", 6],
  ];
  for (const [text, line] of tagged) {
    it(`refuses the tag in '${text.replace(/\n\s*/g, " ")}' at line ${line}`, () => {
      expectInputError(() => parseDesign(withBase(text), FILE), { file: FILE, line, message: [/custom YAML tags are not allowed/] });
    });
  }
});

describe("parseDesign: unknown keys (line and a did-you-mean hint)", () => {
  it("at the top level", () => {
    expectInputError(() => parseDesign(withBase("modle: x"), FILE), {
      file: FILE,
      line: 6,
      key: "modle",
      message: [/unknown key 'modle'/],
      hint: /did you mean 'model'\?/,
    });
  });

  it("under inference", () => {
    expectInputError(() => parseDesign(withBase("inference:", "  method: fdr", "  treshold: 3"), FILE), {
      file: FILE,
      line: 8,
      key: "inference.treshold",
      message: [/unknown key 'inference.treshold'/],
      hint: /did you mean 'inference.threshold'\?/,
    });
  });

  it("far from every key: the hint lists the valid keys", () => {
    expectInputError(() => parseDesign(withBase("zzzzzzzzzz: 1"), FILE), {
      file: FILE,
      line: 6,
      key: "zzzzzzzzzz",
      hint: /valid keys: subjects, connectomes, regions, model, missing_values, levels, center, select, cohort_table, contrasts, transform, scale, edges, symmetrize, asymmetry_tolerance, inference/,
    });
    expectInputError(() => parseDesign(withBase("inference:", "  qqqqqqqqqqqq: 1"), FILE), {
      file: FILE,
      line: 7,
      key: "inference.qqqqqqqqqqqq",
      hint: /valid keys: method, threshold, size, permutations, seed, alpha, blocks, block_permutation, tail, fdr, scheme/,
    });
  });

  it("a key written with the wrong letter case or a merge key is unknown too", () => {
    expectInputError(() => parseDesign(withBase("Model: x"), FILE), { file: FILE, line: 6, key: "Model", hint: /did you mean 'model'/ });
    expectInputError(() => parseDesign(withBase("<<: {a: 1}"), FILE), { file: FILE, line: 6, key: "<<" });
  });
});

describe("parseDesign: bad values (InputError at the key and its line)", () => {
  const bad: Array<[string, string, number, RegExp]> = [
    ["transform: log", "transform", 6, /'transform' must be none, fisher-z or log1p, found 'log'/],
    ["symmetrize: 1", "symmetrize", 6, /true or false/],
    ["asymmetry_tolerance: -1", "asymmetry_tolerance", 6, /number ≥ 0/],
    ["asymmetry_tolerance: small", "asymmetry_tolerance", 6, /number ≥ 0/],
    ["center: [1]", "center", 6, /'center' lists numeric columns/],
    ["center: {age: 1}", "center", 6, /'center' lists/],
    ["levels: [a]", "levels", 6, /'levels' maps a factor column/],
    ["levels:\n  group: [a]", "levels", 6, /levels of 'group' must be a list of at least two/],
    ["levels:\n  group: a", "levels", 6, /at least two/],
    ["levels:\n  group: [a, a]", "levels", 6, /levels of 'group' repeat a level/],
    ["levels:\n  group: [a, [b]]", "levels", 6, /at least two level names/],
    ["regions: ''", "regions", 6, /'regions' must be a text value/],
    ["inference: [a]", "inference", 6, /'inference' must be a mapping/],
    ["inference:", "inference", 6, /'inference' must be a mapping/],
    ["inference:\n  method: clusters", "inference.method", 7, /must be one of components, fdr, max-t, threshold-free; found 'clusters'/],
    ["inference:\n  size: volume", "inference.size", 7, /must be one of extent, mass/],
    ["inference:\n  tail: two", "inference.tail", 7, /must be one of upper, lower, both/],
    ["inference:\n  fdr: bonferroni", "inference.fdr", 7, /must be one of bh, by/],
    ["inference:\n  scheme: bootstrap", "inference.scheme", 7, /must be one of auto, permute, sign-flip/],
    ["inference:\n  block_permutation: across", "inference.block_permutation", 7, /must be one of within, whole/],
    ["inference:\n  method: 3", "inference.method", 7, /found '3'/],
    ["inference:\n  threshold: high", "inference.threshold", 7, /positive number/],
    ["inference:\n  threshold: 0", "inference.threshold", 7, /positive number/],
    ["inference:\n  threshold: -2", "inference.threshold", 7, /positive number/],
    ["inference:\n  threshold: .inf", "inference.threshold", 7, /positive number/],
    ["inference:\n  threshold: .nan", "inference.threshold", 7, /positive number/],
    ["inference:\n  permutations: 0", "inference.permutations", 7, /whole number from 1 to 10,000,000/],
    ["inference:\n  permutations: 1.5", "inference.permutations", 7, /whole number/],
    ["inference:\n  permutations: 10000001", "inference.permutations", 7, /whole number/],
    ["inference:\n  seed: -1", "inference.seed", 7, /whole number ≥ 0/],
    ["inference:\n  seed: 1.5", "inference.seed", 7, /whole number ≥ 0/],
    ["inference:\n  seed: 9007199254740992", "inference.seed", 7, /whole number ≥ 0/],
    ["inference:\n  alpha: 1", "inference.alpha", 7, /between 0 and 1/],
    ["inference:\n  alpha: 0", "inference.alpha", 7, /between 0 and 1/],
    ["inference:\n  blocks: ''", "inference.blocks", 7, /names a column/],
    ["inference:\n  blocks: [site]", "inference.blocks", 7, /names a column/],
    // Numbers that overflow a double (YAML reads 1e400 as Infinity) are refused by key, as written.
    ["asymmetry_tolerance: 1e400", "asymmetry_tolerance", 6, /must be a finite number ≥ 0; found '1e400'/],
    ["inference:\n  threshold: 1e400", "inference.threshold", 7, /positive number .*; found '1e400'/],
    ["inference:\n  threshold: [2, 1e400]", "inference.threshold", 7, /positive finite numbers/],
    ["inference:\n  alpha: 1e400", "inference.alpha", 7, /found '1e400'/],
    ["inference:\n  permutations: 1e400", "inference.permutations", 7, /found '1e400'/],
    ["inference:\n  seed: 1e400", "inference.seed", 7, /found '1e400'/],
    ["inference:\n  enhancement:\n    step: 1e400", "inference.enhancement.step", 8, /found '1e400'/],
    ["inference:\n  enhancement:\n    height_exponent: -1e400", "inference.enhancement.height_exponent", 8, /found '-1e400'/],
    ["levels:\n  site: [1e400, 2]", "levels", 6, /texts or finite numbers/],
    // missing_values: texts or numbers, bounded.
    ["missing_values: true", "missing_values", 6, /'missing_values' lists the cell texts read as missing/],
    ["missing_values: [NA, [-999]]", "missing_values", 6, /texts or numbers/],
    ["missing_values: {a: b}", "missing_values", 6, /texts or numbers/],
    ["missing_values: [' NA']", "missing_values", 6, /without tabs or surrounding spaces/],
    [`missing_values: [${Array.from({ length: 101 }, (_, k) => `"m${k}"`).join(", ")}]`, "missing_values", 6, /up to 100/],
  ];
  for (const [text, key, line, message] of bad) {
    it(`'${text.replace(/\n\s*/g, " ")}' → ${key}:${line}`, () => {
      expectInputError(() => parseDesign(withBase(text), FILE), { file: FILE, key, line, message: [message] });
    });
  }

  const header = "subjects: s.tsv\nconnectomes: c/{participant_id}.tsv\nmodel: x\n";
  const badRequired: Array<[string, string, number | undefined, RegExp]> = [
    ["connectomes: c\nmodel: x\ncontrasts:\n  a: x\n", "subjects", undefined, /the design needs 'subjects'/],
    ["subjects: c\nmodel: x\ncontrasts:\n  a: x\n", "connectomes", undefined, /the design needs 'connectomes'/],
    ["subjects: c\nconnectomes: c\ncontrasts:\n  a: x\n", "model", undefined, /the design needs 'model'/],
    ["subjects: c\nconnectomes: c\nmodel:\ncontrasts:\n  a: x\n", "model", 3, /'model' must be a text value/],
    ["subjects: c\nconnectomes: c\nmodel: x\n", "contrasts", undefined, /at least one contrast/],
    ["subjects: 3\nconnectomes: c\nmodel: x\ncontrasts:\n  a: x\n", "subjects", 1, /'subjects' must be a text value/],
    ["subjects: '  '\nconnectomes: c\nmodel: x\ncontrasts:\n  a: x\n", "subjects", 1, /text value/],
    ["subjects: a\nconnectomes: [c]\nmodel: x\ncontrasts:\n  a: x\n", "connectomes", 2, /text value/],
    ["subjects: a\nconnectomes: c\nmodel: [x]\ncontrasts:\n  a: x\n", "model", 3, /'model' must be a text value/],
    [header + "contrasts: {}\n", "contrasts", 4, /lists no contrast/],
    [header + "contrasts: [a]\n", "contrasts", 4, /must map names to contrasts/],
    [header + "contrasts:\n  a/b: x\n", "contrasts.a/b", 5, /not usable as a folder name/],
    [header + "contrasts:\n  _a: x\n", "contrasts._a", 5, /not usable as a folder name/],
    [header + `contrasts:\n  ${"a".repeat(101)}: x\n`, `contrasts.${"a".repeat(101)}`, 5, /not usable as a folder name/],
    [header + "contrasts:\n  Up: x\n  up: x\n", "contrasts.up", 6, /differ only in letter case/],
    [header + "contrasts:\n  up: [1, a]\n", "contrasts.up", 5, /finite numbers/],
    [header + "contrasts:\n  up: [1, .nan]\n", "contrasts.up", 5, /finite numbers/],
    [header + "contrasts:\n  up: []\n", "contrasts.up", 5, /finite numbers/],
    [header + "contrasts:\n  up: {a: 1}\n", "contrasts.up", 5, /an expression such as/],
    [header + "contrasts:\n  up:\n", "contrasts.up", 5, /an expression such as/],
    [header + "contrasts:\n  up: true\n", "contrasts.up", 5, /an expression such as/],
  ];
  for (const [text, key, line, message] of badRequired) {
    it(`${key}${line ? `:${line}` : ""} → ${message.source}`, () => {
      expectInputError(() => parseDesign(text, FILE), line === undefined ? { file: FILE, key, message: [message] } : { file: FILE, key, line, message: [message] });
    });
  }

  it("the folder-name error carries a hint", () => {
    expectInputError(() => parseDesign(header + "contrasts:\n  a b: x\n", FILE), {
      file: FILE,
      key: "contrasts.a b",
      line: 5,
      hint: /letters, digits/,
    });
  });
});

describe("parseDesign: documents that are not a design", () => {
  const notYaml: Array<[string, number, RegExp]> = [
    [withBase("inference: ["), 7, /not valid YAML/],
    [withBase("model: y"), 6, /not valid YAML: Map keys must be unique/],
    [withBase("---", "subjects: b"), 6, /not valid YAML/],
    // An unclosed quote is reported where the input ends (line 3), as the YAML parser finds it.
    ["subjects: 'open\nmodel: x\n", 3, /not valid YAML: Missing closing/],
    [withBase("\tinference: x"), 6, /not valid YAML/],
  ];
  for (const [text, line, message] of notYaml) {
    it(`YAML error at line ${line}: ${JSON.stringify(text.split("\n").slice(5).join("\\n"))}`, () => {
      expectInputError(() => parseDesign(text, FILE), { file: FILE, line, message: [message] });
    });
  }

  it("a list, a scalar or an empty file is not a mapping: InputError at line 1", () => {
    for (const text of ["- a\n- b\n", "just text\n", "", "# only a comment\n"]) {
      expectInputError(() => parseDesign(text, FILE), { file: FILE, line: 1, message: [/a design file is a YAML mapping/] });
    }
  });
});

describe("readDesign", () => {
  const folder = mkdtempSync(path.join(tmpdir(), "plexus-design-"));
  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it("reads a file and resolves baseDir to its folder", () => {
    const file = path.join(folder, "d.yaml");
    writeFileSync(file, BASE);
    const design = readDesign(file);
    expect(design.baseDir).toBe(folder);
    expect(design.file).toBe(file);
  });

  it("a missing file is an InputError naming it", () => {
    const file = path.join(folder, "missing.yaml");
    expectInputError(() => readDesign(file), { file, message: [/cannot read .*no such file/] });
  });
});

describe("parseDesign never throws anything but an InputError (fast-check)", () => {
  it("on random YAML-ish text", () => {
    const piece = fc.constantFrom(
      "subjects", "connectomes", "model", "contrasts", "inference", "levels", "center", "threshold", "up", "no",
      ":", " ", "  ", "\n", "- ", "[", "]", "{", "}", ",", "'", '"', "!", "!!", "&a", "*a", "#", "|", ">", "---",
      "1", "0.5", "-3", ".inf", "true", "null", "~", "group[patient]", "\t", "?", "<<", "%YAML 1.2",
    );
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 30 }), (parts) => {
        resultOrInputError(() => parseDesign(parts.join(""), FILE));
      }),
      { seed: 31, numRuns: 3000 },
    );
  });

  it("on a valid design with random text spliced in at a random place", () => {
    const valid = withBase("levels:", "  group: [control, patient]", "inference:", "  threshold: 2", "  tail: both");
    fc.assert(
      fc.property(fc.nat({ max: valid.length }), fc.string({ unit: "binary", maxLength: 12 }), (at, insert) => {
        const design = resultOrInputError(() => parseDesign(valid.slice(0, at) + insert + valid.slice(at), FILE));
        if (design) {
          expect(design.contrasts.length).toBeGreaterThan(0);
          expect(typeof design.model).toBe("string");
        }
      }),
      { seed: 32, numRuns: 2000 },
    );
  });

  it("on arbitrary Unicode text", () => {
    fc.assert(
      fc.property(fc.string({ unit: "binary", maxLength: 60 }), (text) => {
        resultOrInputError(() => parseDesign(text, FILE));
      }),
      { seed: 33, numRuns: 1000 },
    );
  });
});

describe("parseDesign: bounded lists", () => {
  it("more than 1000 contrasts are refused, naming the limit", () => {
    const many = ["contrasts:", ...Array.from({ length: 1001 }, (_, k) => `  c${k}: age`)];
    const text = ["subjects: p.tsv", "connectomes: c/{participant_id}.tsv", "model: age", ...many].join("\n");
    expectInputError(() => parseDesign(text, FILE), { file: FILE, key: "contrasts", line: 4, message: [/1001 contrasts, more than the limit of 1000/] });
  });

  it("a threshold list of more than 20 is refused, naming the limit", () => {
    const list = Array.from({ length: 21 }, (_, k) => 2 + k / 10).join(", ");
    expectInputError(() => parseDesign(withBase(`inference:\n  threshold: [${list}]`), FILE), {
      file: FILE,
      key: "inference.threshold",
      line: 7,
      message: [/1 to 20 different/],
    });
  });
});

describe("parseDesign: missing_values", () => {
  it("replaces the default list of cell texts read as missing", () => {
    expect(parseDesign(withBase('missing_values: ["", "-999", "NA"]'), FILE).missingValues).toEqual(["", "-999", "NA"]);
    expect(parseDesign(withBase("missing_values: []"), FILE).missingValues).toEqual([]);
    expect(parseDesign(withBase("missing_values: missing"), FILE).missingValues).toEqual(["missing"]);
  });

  it("takes numbers as the YAML source writes them, and a bare scalar as a list of one", () => {
    expect(parseDesign(withBase("missing_values: [-999, NA, 99.0, 1e3]"), FILE).missingValues).toEqual(["-999", "NA", "99.0", "1e3"]);
    expect(parseDesign(withBase("missing_values: -999"), FILE).missingValues).toEqual(["-999"]);
    expect(parseDesign(withBase("missing_values: NA"), FILE).missingValues).toEqual(["NA"]);
    expect(parseDesign(withBase("missing_values:\n  - -999\n  - '.'"), FILE).missingValues).toEqual(["-999", "."]);
  });
});

describe("parseDesign: select and cohort_table", () => {
  it("select maps columns to the cell texts kept; numbers and booleans as written; one value alone is a list of one", () => {
    const design = parseDesign(withBase("select:", "  group: [patient]", "  site: [1, 02, 3.0, true]", "  sex: F"), FILE);
    expect(design.select).toEqual([
      { column: "group", values: ["patient"], line: 7 },
      { column: "site", values: ["1", "02", "3.0", "true"], line: 8 },
      { column: "sex", values: ["F"], line: 9 },
    ]);
    expect(parseDesign(BASE, FILE).select).toEqual([]);
  });

  it("refuses a select that is not a mapping of non-empty lists of texts or numbers", () => {
    expectInputError(() => parseDesign(withBase("select: [patient]"), FILE), { file: FILE, line: 6, key: "select" });
    expectInputError(() => parseDesign(withBase("select: {}"), FILE), { file: FILE, line: 6, key: "select" });
    expectInputError(() => parseDesign(withBase("select:", "  group: []"), FILE), { file: FILE, line: 7, key: "select.group" });
    expectInputError(() => parseDesign(withBase("select:", "  group: [~]"), FILE), { file: FILE, line: 7, key: "select.group" });
    expectInputError(() => parseDesign(withBase("select:", "  group: [[a]]"), FILE), { file: FILE, line: 7, key: "select.group" });
    expectInputError(() => parseDesign(withBase("select:", "  group: ''"), FILE), { file: FILE, line: 7, key: "select.group" });
  });

  it("cohort_table takes by (a column, or ~ for none) and variables (columns)", () => {
    expect(parseDesign(withBase("cohort_table: { by: site, variables: [age, education] }"), FILE).cohortTable).toEqual({ by: "site", variables: ["age", "education"] });
    expect(parseDesign(withBase("cohort_table: { by: ~ }"), FILE).cohortTable).toEqual({ by: null });
    expect(parseDesign(withBase("cohort_table: { variables: education }"), FILE).cohortTable).toEqual({ variables: ["education"] });
    expect(parseDesign(BASE, FILE).cohortTable).toEqual({});
  });

  it("refuses a cohort_table of the wrong shape, naming the key", () => {
    expectInputError(() => parseDesign(withBase("cohort_table: group"), FILE), { file: FILE, line: 6, key: "cohort_table" });
    expectInputError(() => parseDesign(withBase("cohort_table:", "  by: [group]"), FILE), { file: FILE, line: 7, key: "cohort_table.by" });
    expectInputError(() => parseDesign(withBase("cohort_table:", "  variables: [1]"), FILE), { file: FILE, line: 7, key: "cohort_table.variables" });
    expectInputError(() => parseDesign(withBase("cohort_table:", "  bye: group"), FILE), { file: FILE, line: 7, key: "cohort_table.bye", hint: /did you mean 'cohort_table\.by'/ });
  });
});
