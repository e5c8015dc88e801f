import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { mutateBytes } from "../../helpers/mutateBytes.js";
import { describe, expect, it } from "vitest";
import { ciftiContainer } from "../../../src/io/arrays/ciftiContainer.js";
import { detectFormat } from "../../../src/io/arrays/fileFormat.js";
import { openContainer } from "../../../src/io/arrays/openContainer.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { loadFixture } from "../../helpers/fixtures.js";
import { expectInputError, parsesOrInputError } from "./inputErrorAssertions.js";

/**
 * The CIFTI-2 parcellated connectivity reader against files written by
 * nibabel's Cifti2 classes (test/fixtures/cifti/make_pconn.py): every value,
 * shape and parcel name as nibabel reads it back (expected.json, in the CIFTI
 * matrix's (row, column) order, which the script checks against the raw
 * bytes), and the same cohort read from plain text written by the same script.
 */
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/cifti");

interface ExpectedPconn {
  intent: [string, number];
  map_dimensions: number[][];
  map_types: string[];
  row_parcels: string[] | null;
  column_parcels: string[] | null;
  shape: number[];
  values: number[];
  byte_order: "<" | ">";
  datatype: number;
  scl_slope: number;
  scl_inter: number;
}
interface ExpectedCifti {
  nibabel_version: string;
  numpy_version: string;
  subjects: string[];
  parcels: string[];
  table_order: string[];
  files: Record<string, ExpectedPconn>;
  refused: Record<string, { intent: [string, number]; map_types: string[] }>;
}
const expected = loadFixture<ExpectedCifti>("cifti/expected.json");
const fixturePath = (name: string): string => join(FIXTURES, name);
const fixtureBytes = (name: string): Uint8Array => new Uint8Array(readFileSync(fixturePath(name)));

const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };
const subjects: ConnectomeSubject[] = expected.subjects.map((id, tableRow) => ({ id, tableRow, values: { participant_id: id } }));
const READABLE = Object.keys(expected.files).filter((name) => name !== "different_parcels.pconn.nii");

/** Bit-exact comparison (tolerance 0) printing the input, index, expected, actual and difference on failure. */
function expectSameValues(actual: Float64Array, wanted: ArrayLike<number>, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

describe(`CIFTI-2 parcellated connectivity written by nibabel ${expected.nibabel_version} (test/fixtures/cifti/make_pconn.py)`, () => {
  it("the fixtures cover one map for both dimensions and two maps, both byte orders, float32, float64 and scaled int16", () => {
    const files = Object.values(expected.files);
    expect(files.map((f) => JSON.stringify(f.map_dimensions))).toEqual(expect.arrayContaining(["[[0,1]]", "[[0],[1]]"]));
    expect(new Set(files.map((f) => f.byte_order))).toEqual(new Set(["<", ">"]));
    expect(new Set(files.map((f) => f.datatype))).toEqual(new Set([16, 64, 4]));
    expect(files.some((f) => f.scl_slope !== 1)).toBe(true);
    expect(files.every((f) => f.intent[1] === 3003)).toBe(true);
  });

  it("the bytes say NIfTI-2, whatever the name", () => {
    for (const name of Object.keys(expected.files)) expect(detectFormat(fixtureBytes(name))).toBe("nifti2");
  });

  it.each(READABLE)("%s: the matrix and the parcel names as nibabel reads them", (name) => {
    const file = expected.files[name];
    const container = openContainer(fixtureBytes(name), name, "nifti2");
    expect(container.format).toBe("CIFTI-2 parcellated connectivity");
    expect(container.entries).toHaveLength(1);
    expect(container.entries[0]).toMatchObject({ name: "", shape: file.shape, numeric: true });
    // Source: nibabel's ParcelsAxis names of the row dimension (dimension 1), in order.
    expect(container.labels).toEqual(file.row_parcels);
    const array = container.read("");
    expect(array.shape).toEqual(file.shape);
    // Source: nibabel's get_fdata() (scl_slope and scl_inter applied), element (row r, column c) = get_fdata()[c, r].
    expectSameValues(array.values, file.values, name);
  });

  it("orientation: element (row r, column c) of the directed matrix is 10 r + c + 0.5 in either byte order", () => {
    for (const name of ["directed.pconn.nii", "directed_big_endian.pconn.nii"]) {
      const { values } = ciftiContainer(fixtureBytes(name), name).read("");
      // Source: the matrix make_pconn.py wrote (and nibabel read back as get_fdata().T).
      expectSameValues(values, Array.from({ length: 16 }, (_, k) => 10 * Math.floor(k / 4) + (k % 4) + 0.5), name);
    }
  });

  it("rows and columns with different parcels are refused, naming both", () => {
    expectInputError(() => ciftiContainer(fixtureBytes("different_parcels.pconn.nii"), "different_parcels.pconn.nii"), {
      file: "different_parcels.pconn.nii",
      message: ["name different parcels", "rows: 'alpha_ridge', 'beta_ridge', 'gamma_ridge'", "columns: 'delta_sulcus'", "position 1"],
    });
  });
});

describe("CIFTI-2 and NIfTI files that are not parcellated connectivity are refused by what they are", () => {
  it("a parcellated scalars file (nibabel ScalarAxis × ParcelsAxis)", () => {
    const refused = expected.refused["scalars.pscalar.nii"];
    expect(refused.intent).toEqual(["ConnParcelScalr", 3008]); // source: nibabel
    expectInputError(() => openContainer(fixtureBytes("scalars.pscalar.nii"), "scalars.pscalar.nii", "nifti2"), {
      file: "scalars.pscalar.nii",
      message: ["a CIFTI-2 parcellated scalars file (.pscalar.nii", `NIfTI intent ${refused.intent[1]};`, "dimension 0: scalars, dimension 1: parcels", "reads CIFTI-2 parcellated connectivity (.pconn.nii) only"],
      hint: "path template",
    });
  });

  it("a dense time series file (nibabel SeriesAxis × BrainModelAxis)", () => {
    const refused = expected.refused["series.dtseries.nii"];
    expect(refused.intent).toEqual(["ConnDenseSeries", 3002]); // source: nibabel
    expect(refused.map_types).toEqual(["CIFTI_INDEX_TYPE_SERIES", "CIFTI_INDEX_TYPE_BRAIN_MODELS"]); // source: nibabel
    expectInputError(() => openContainer(fixtureBytes("series.dtseries.nii"), "series.dtseries.nii", "nifti2"), {
      file: "series.dtseries.nii",
      message: ["a CIFTI-2 dense time series file (.dtseries.nii", `NIfTI intent ${refused.intent[1]};`, "dimension 0: series, dimension 1: brain models", ".pconn.nii) only"],
    });
  });

  it("a NIfTI-2 image without CIFTI XML, and a NIfTI-1 image", () => {
    expectInputError(() => openContainer(fixtureBytes("volume.nii"), "volume.nii", detectFormat(fixtureBytes("volume.nii"))), {
      file: "volume.nii",
      message: ["a NIfTI-2 image (2 × 2 × 2", "without the CIFTI-2 XML extension", ".pconn.nii) only"],
    });
    expect(detectFormat(fixtureBytes("volume_nifti1.nii"))).toBe("nifti1");
    expectInputError(() => openContainer(fixtureBytes("volume_nifti1.nii"), "volume_nifti1.nii", "nifti1"), {
      file: "volume_nifti1.nii",
      message: ["a NIfTI-1 image (2 × 2 × 2, NIfTI intent 0), not a CIFTI-2 file", ".pconn.nii) only"],
    });
  });
});

describe("CIFTI-2: damaged files are InputErrors naming the file", () => {
  const name = "participants/sub-01.pconn.nii";

  it("truncated data", () => {
    const bytes = fixtureBytes(name);
    expectInputError(() => ciftiContainer(bytes.slice(0, bytes.length - 1), name), { file: name, message: ["truncated data", "100 bytes"] });
  });

  it("cut anywhere: never anything but an InputError, and an error whenever the data is cut", () => {
    const bytes = fixtureBytes(name);
    for (let length = 0; length < bytes.length; length++) {
      const cut = bytes.slice(0, length);
      expect(parsesOrInputError(() => ciftiContainer(cut, name).read(""))).toBe(true);
      expect(() => ciftiContainer(cut, name)).toThrow();
    }
  });

  it("malformed XML names its line and column", () => {
    const bytes = fixtureBytes(name);
    const text = new TextDecoder("latin1").decode(bytes);
    const at = text.indexOf("</Matrix>");
    bytes.set(new TextEncoder().encode("</Matrax>"), at);
    expectInputError(() => ciftiContainer(bytes, name), { file: name, message: ["CIFTI-2 XML", "line 1, column"] });
  });

  it("an extension that claims more bytes than lie before the data", () => {
    const bytes = fixtureBytes(name);
    new DataView(bytes.buffer).setInt32(544, 1 << 20, true);
    expectInputError(() => ciftiContainer(bytes, name), { file: name, message: ["extension at byte 544 claims 1048576 bytes"] });
  });

  it("a parcel name repeated", () => {
    const bytes = fixtureBytes("directed.pconn.nii");
    const text = new TextDecoder("latin1").decode(bytes);
    bytes.set(new TextEncoder().encode('"north_gyrus_1"'), text.indexOf('"north_gyrus_2"'));
    expectInputError(() => ciftiContainer(bytes, "directed.pconn.nii"), { file: "directed.pconn.nii", message: ["'north_gyrus_1' appears twice"] });
  });

  it("random byte changes, cuts and insertions never raise anything but an InputError", () => {
    const sources = ["participants/sub-01.pconn.nii", "participants/sub-04.pconn.nii", "directed_big_endian.pconn.nii", "scaled_int16.pconn.nii", "series.dtseries.nii"].map(fixtureBytes);
    const mutation = fc.record({
      source: fc.nat(sources.length - 1),
      edits: fc.array(fc.tuple(fc.constantFrom("set", "cut", "insert"), fc.nat(2200), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 4 }),
    });
    fc.assert(
      fc.property(mutation, ({ source, edits }) => {
        const bytes = mutateBytes(sources[source], edits);
        return parsesOrInputError(() => ciftiContainer(bytes, "m.pconn.nii").read(""));
      }),
      { numRuns: 3000 },
    );
  });
});

describe("CIFTI-2 through loadConnectomes: one .pconn.nii per participant through a template", () => {
  const template = { kind: "template" as const, template: "participants/{participant_id}.pconn.nii", baseDir: FIXTURES };

  it("without a regions table: the edge data of the cohort in plain text, and the parcel names as labels", () => {
    const text = loadConnectomes({ kind: "template", template: "text/{participant_id}.txt", baseDir: FIXTURES }, subjects, PLAIN);
    const loaded = loadConnectomes(template, subjects, PLAIN);
    // Source: the same matrices as text, each float32 value written by Python's repr (make_pconn.py).
    expectSameValues(loaded.data, text.data, "participants/{participant_id}.pconn.nii");
    // Source: nibabel's ParcelsAxis names.
    expect(loaded.labels).toEqual(expected.parcels);
    expect(loaded.reading).toEqual({ reader: "CIFTI-2 parcellated connectivity", shape: [5, 5], labels: "file" });
  });

  it("with a regions table in another order: the data reordered to the table's order", () => {
    const reordered = loadConnectomes({ kind: "template", template: "text_reordered/{participant_id}.txt", baseDir: FIXTURES }, subjects, PLAIN);
    const loaded = loadConnectomes(template, subjects, { ...PLAIN, regionTable: { labels: expected.table_order, file: "regions.tsv" } });
    // Source: the matrices make_pconn.py wrote as text in the table's parcel order.
    expectSameValues(loaded.data, reordered.data, "pconn with the regions table's order");
    expect(loaded.labels).toBeUndefined();
    expect(loaded.reading).toEqual({ reader: "CIFTI-2 parcellated connectivity", shape: [5, 5], labels: "regions table, matched to the file's labels", reordered: true });
  });

  it("a regions table in the file's own order reorders nothing", () => {
    const loaded = loadConnectomes(template, subjects, { ...PLAIN, regionTable: { labels: expected.parcels, file: "regions.tsv" } });
    expect(loaded.reading.reordered).toBeUndefined();
  });

  it("a regions table with another parcel is an error naming the labels", () => {
    const labels = [...expected.parcels.slice(0, 4), "far_lobe"];
    expectInputError(() => loadConnectomes(template, subjects, { ...PLAIN, regionTable: { labels, file: "regions.tsv" } }), {
      file: fixturePath("participants/sub-01.pconn.nii"),
      message: ["'far_lobe'", "'west_fold'", "regions.tsv"],
    });
  });

  it("a .pconn.nii named as one file for every participant asks for a template", () => {
    expectInputError(() => loadConnectomes({ kind: "file", path: fixturePath("participants/sub-01.pconn.nii") }, subjects, PLAIN), {
      file: fixturePath("participants/sub-01.pconn.nii"),
      key: "connectomes",
      message: ["CIFTI-2 parcellated connectivity file holds no stack", "the array (5 × 5 float32)"],
      hint: "path template",
    });
  });
});
