import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, truncateSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { readDesign } from "../../../src/io/designFile.js";
import { readParticipants } from "../../../src/io/participants.js";
import { DESIGN_FILE_LIMIT_BYTES, InputFile, TextFileReader, readTextFile, readTextInput } from "../../../src/io/readInputFile.js";
import { readRegions } from "../../../src/io/regions.js";
import { readPairsFile } from "../../../src/strength/readPairsFile.js";
import { expectInputError } from "./inputErrorAssertions.js";

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-io-read-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function file(name: string, content: string | Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

/** The error `action` throws (it must throw one). */
function thrown(action: () => unknown): unknown {
  try {
    action();
  } catch (error) {
    return error;
  }
  throw new Error("expected an error");
}

describe("TextFileReader gives the string readTextFile gives (reference: Node's readFileSync(path, 'utf8'))", () => {
  const longAscii = Array.from({ length: 20000 }, (_, k) => `${k * 0.125}\t${-k}`).join("\n") + "\n";
  const cases: [string, string | Uint8Array][] = [
    ["ASCII numbers", "1\t0.5\n0.5\t1\n"],
    ["a UTF-8 byte-order mark", "\ufeff1,0.5\n0.5,1\n"],
    ["CRLF line ends", "1 0.5\r\n0.5 1\r\n"],
    ["non-ASCII UTF-8 text", "région\t区域\t😀\n"],
    ["invalid UTF-8 bytes (replaced by U+FFFD)", new Uint8Array([0x31, 0x20, 0xff, 0xfe, 0x0a, 0xc3, 0x28])],
    ["a byte-order mark then invalid UTF-8", new Uint8Array([0xef, 0xbb, 0xbf, 0x80, 0x31])],
    ["an empty file", ""],
    ["a long ASCII file", longAscii],
    ["a short file after a long one (buffer reused)", "2 3\n3 2\n"],
    ["control characters and DEL, all ASCII", "\u0000\u0001\u007f\t \n"],
  ];

  it("for every kind of content, one reader reading the files in turn", () => {
    const reader = new TextFileReader();
    for (const [name, content] of cases) {
      const path = file(`${name.replace(/\W+/g, "-")}.txt`, content);
      expect(reader.read(path), name).toBe(readTextFile(path));
    }
  });

  it("files of growing size, including exactly the size of the buffer so far", () => {
    const reader = new TextFileReader();
    for (const size of [0, 1, 4095, 4096, 4097, 9000, 100_000, 4097]) {
      const path = file(`size-${size}.txt`, "7".repeat(size));
      expect(reader.read(path), `size ${size}`).toBe(readTextFile(path));
    }
  });

  it("a missing file or a folder is the same InputError (file, message, hint) as from readTextFile", () => {
    const reader = new TextFileReader();
    const folder = join(dir, "a-folder");
    mkdirSync(folder, { recursive: true });
    for (const path of [join(dir, "nowhere.txt"), folder]) {
      const ours = thrown(() => reader.read(path, "the matrix of participant 'x'"));
      const reference = thrown(() => readTextFile(path, "the matrix of participant 'x'"));
      expect(ours).toBeInstanceOf(InputError);
      expect(reference).toBeInstanceOf(InputError);
      const [a, b] = [ours as InputError, reference as InputError];
      expect({ message: a.message, location: a.location, hint: a.hint }).toEqual({
        message: b.message,
        location: b.location,
        hint: b.hint,
      });
    }
  });

  it("a file over 2 GiB (sparse) is an InputError worded as readTextFile's, without reading it", () => {
    // Node 20's readFileSync(path, "utf8") fails on such a file with this message (checked by hand; it reads
    // the 2 GiB first, too slow for a unit test).
    const path = file("huge.txt", "");
    truncateSync(path, 2 ** 31 + 10);
    expectInputError(() => new TextFileReader().read(path, "the matrix"), {
      file: path,
      message: [/^cannot read .*huge\.txt: Cannot create a string longer than 0x[0-9a-f]+ characters$/],
      hint: "the matrix",
    });
    rmSync(path);
  });
});

describe("InputFile", () => {
  it("reads pieces at given offsets and stops short only at the end of the file", () => {
    const bytes = Uint8Array.from({ length: 1000 }, (_, k) => (k * 7) % 256);
    const path = file("pieces.bin", bytes);
    const input = InputFile.open(path, "the stack");
    try {
      expect(input.size).toBe(1000);
      const piece = new Uint8Array(100);
      expect(input.readAt(piece, 450)).toBe(100);
      expect(Array.from(piece)).toEqual(Array.from(bytes.subarray(450, 550)));
      expect(input.readAt(piece, 950)).toBe(50);
      expect(Array.from(piece.subarray(0, 50))).toEqual(Array.from(bytes.subarray(950)));
      expect(input.readAt(piece, 1000)).toBe(0);
    } finally {
      input.close();
    }
  });

  it("a file that shrinks after opening gives a short read, not an error", () => {
    const path = file("shrinks.bin", new Uint8Array(500));
    const input = InputFile.open(path);
    try {
      truncateSync(path, 120);
      expect(input.size).toBe(500);
      expect(input.readAt(new Uint8Array(200), 0)).toBe(120);
    } finally {
      input.close();
    }
  });

  it("a missing file is an InputError naming it, with the hint", () => {
    const path = join(dir, "missing.npy");
    expectInputError(() => InputFile.open(path, "the .npy stack"), {
      file: path,
      message: ["cannot read", "no such file or directory (ENOENT)"],
      hint: "the .npy stack",
    });
  });

  it("a folder is an InputError naming it when opened (checked with stat, before opening)", () => {
    const folder = join(dir, "folder-input");
    mkdirSync(folder, { recursive: true });
    expectInputError(() => InputFile.open(folder), { file: folder, message: ["cannot read", "a directory, not a regular file"] });
  });
});

describe("only regular files are read, text inputs have a size limit and must be UTF-8", () => {
  it("a symbolic link to a character device (/dev/zero, which never ends) is refused before it is opened", () => {
    const link = join(dir, "zero-link.tsv");
    symlinkSync("/dev/zero", link);
    expectInputError(() => readTextFile(link), { file: link, message: ["a character device, not a regular file"] });
    expectInputError(() => readTextInput(link, { limitBytes: 100, what: "the table" }), { file: link, message: ["a character device"] });
    expectInputError(() => new TextFileReader().readBytes(link), { file: link, message: ["a character device"] });
    expectInputError(() => InputFile.open(link), { file: link, message: ["a character device"] });
  });

  it("a named pipe (FIFO) is refused instead of waiting forever for a writer", () => {
    const fifo = join(dir, "pipe.tsv");
    execFileSync("mkfifo", [fifo]);
    expectInputError(() => readTextInput(fifo, { limitBytes: 100, what: "the table" }), { file: fifo, message: ["a named pipe (FIFO), not a regular file"] });
    expectInputError(() => new TextFileReader().read(fifo), { file: fifo, message: ["a named pipe"] });
    expectInputError(() => InputFile.open(fifo), { file: fifo, message: ["a named pipe"] });
  });

  it("a symbolic link to a regular file is read", () => {
    const target = file("target.tsv", "a\tb\n");
    const link = join(dir, "link-to-target.tsv");
    symlinkSync(target, link);
    expect(readTextInput(link, { limitBytes: 100, what: "the table" })).toBe("a\tb\n");
  });

  it("a text input over its limit is refused, naming the limit", () => {
    const big = file("big.yaml", "x".repeat(101));
    expectInputError(() => readTextInput(big, { limitBytes: 100, what: "the design file" }), {
      file: big,
      message: ["the design file is 101 bytes, more than the limit of 100 bytes"],
    });
    expect(readTextInput(file("just.yaml", "x".repeat(100)), { limitBytes: 100, what: "the design file" })).toHaveLength(100);
  });

  it("invalid UTF-8 is an error naming the line of the first bad byte (never replaced silently)", () => {
    const bad = file("latin1.tsv", Buffer.concat([Buffer.from("participant_id\tsite\nsub-01\tz"), Buffer.from([0xfc]), Buffer.from("rich\n")]));
    expectInputError(() => readTextInput(bad, { limitBytes: 1000, what: "the table" }), { file: bad, line: 2, message: ["not valid UTF-8"] });
    const truncated = file("cut.tsv", Buffer.from([0x61, 0x0a, 0x62, 0x0a, 0x63, 0xe2, 0x82]));
    expectInputError(() => readTextInput(truncated, { limitBytes: 1000, what: "the table" }), { file: truncated, line: 3 });
  });

  it("valid UTF-8 with a byte-order mark and non-ASCII text is read as readFileSync reads it, without the mark", () => {
    const good = file("utf8.tsv", "\ufeffrégion\t区域\n");
    expect(readTextInput(good, { limitBytes: 1000, what: "the table" })).toBe("région\t区域\n");
  });

  it("the design file, participants, regions and edge-list readers go through these checks", () => {
    const link = join(dir, "zero-design.yaml");
    symlinkSync("/dev/zero", link);
    expectInputError(() => readDesign(link), { file: link, message: ["a character device"] });
    expectInputError(() => readParticipants(link), { file: link, message: ["a character device"] });
    expectInputError(() => readRegions(link), { file: link, message: ["a character device"] });
    expectInputError(() => readPairsFile(link, [{ label: "A" }, { label: "B" }]), { file: link, message: ["a character device"] });
    const big = file("big-design.yaml", `# ${"x".repeat(DESIGN_FILE_LIMIT_BYTES)}\n`);
    expectInputError(() => readDesign(big), { file: big, message: ["the design file is", "1 MiB"] });
    const bad = file("bad-design.yaml", Buffer.concat([Buffer.from("subjects: p.tsv\nmodel: gr"), Buffer.from([0xff]), Buffer.from("oup\n")]));
    expectInputError(() => readDesign(bad), { file: bad, line: 2, message: ["not valid UTF-8"] });
  });
});
