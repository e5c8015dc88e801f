import { Buffer, constants, isAscii } from "node:buffer";
import { closeSync, fstatSync, openSync, readFileSync, readSync, statSync, type Stats } from "node:fs";
import { InputError } from "../errors.js";

/** The largest design file read: 1 MiB (a design is a page of YAML). */
export const DESIGN_FILE_LIMIT_BYTES = 2 ** 20;
/** The largest participants, regions or edge-list table read: 256 MiB. */
export const TABLE_FILE_LIMIT_BYTES = 2 ** 28;

/**
 * Reading a user's input file: any failure of the operating system (missing
 * file, no permission, a directory) becomes an InputError that names the file
 * and the system's reason, so the CLI prints one line and no stack. Only a
 * regular file (or a symbolic link to one) is opened: a device, a FIFO or a
 * socket is refused before it is opened (reading /dev/zero never ends, opening
 * a FIFO waits for a writer).
 */
export function readTextFile(path: string, hint?: string): string {
  requireRegularFile(path, hint);
  try {
    return readFileSync(path, "utf8");
  } catch (error) {
    throw cannotRead(path, error, hint);
  }
}

/**
 * A text input the user wrote (design file, participants, regions or edge-list
 * table): a regular file of at most `limitBytes` bytes, in valid UTF-8 (an
 * invalid byte is an InputError naming its line, never silently replaced).
 */
export function readTextInput(path: string, options: { limitBytes: number; what: string; hint?: string }): string {
  const size = requireRegularFile(path, options.hint).size;
  if (size > options.limitBytes) throw tooLarge(path, size, options.limitBytes, options.what);
  let bytes: Buffer;
  try {
    bytes = readFileSync(path);
  } catch (error) {
    throw cannotRead(path, error, options.hint);
  }
  if (bytes.length > options.limitBytes) throw tooLarge(path, bytes.length, options.limitBytes, options.what);
  return decodeUtf8(bytes, path);
}

/**
 * Decodes UTF-8 strictly (a leading byte-order mark is dropped); the first
 * invalid byte is an InputError naming its line. A newline byte never occurs
 * inside a multi-byte sequence, so the bad line is the first line that does
 * not decode on its own.
 */
export function decodeUtf8(bytes: Uint8Array, file: string): string {
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    const strict = new TextDecoder("utf-8", { fatal: true, ignoreBOM: true });
    let start = 0;
    for (let line = 1; ; line++) {
      let end = bytes.indexOf(0x0a, start);
      if (end < 0) end = bytes.length;
      try {
        strict.decode(bytes.subarray(start, end));
      } catch {
        throw new InputError("the file is not valid UTF-8 text", { file, line }, "save it as UTF-8 (plain text) and check this line for stray bytes");
      }
      if (end === bytes.length) break;
      start = end + 1;
    }
    throw new InputError("the file is not valid UTF-8 text", { file }, "save it as UTF-8 (plain text)");
  }
}

/**
 * The bytes of a user's input file, up to 2 GiB, in shared memory (a
 * SharedArrayBuffer), so that a reader's worker thread (HDF5's) takes them
 * without a copy; failures as for `readTextFile`.
 */
export function readBinaryFile(path: string, hint?: string): Uint8Array {
  const input = InputFile.open(path, hint);
  try {
    if (input.size > MAX_WHOLE_FILE_BYTES) {
      throw new InputError(`cannot read ${path}: it holds ${input.size} bytes, more than the 2 GiB plexus reads whole`, { file: path }, hint);
    }
    const bytes = new Uint8Array(new SharedArrayBuffer(input.size));
    return bytes.subarray(0, input.readAt(bytes, 0));
  } finally {
    input.close();
  }
}

/**
 * The file's status when `path` is a regular file or a symbolic link to one;
 * otherwise an InputError naming the kind of file found. Checked with stat,
 * before anything opens the file.
 */
export function requireRegularFile(path: string, hint?: string): Stats {
  let stats: Stats;
  try {
    stats = statSync(path);
  } catch (error) {
    throw cannotRead(path, error, hint);
  }
  if (!stats.isFile()) {
    throw new InputError(`cannot read ${path}: it is ${fileKind(stats)}, not a regular file`, { file: path }, hint ?? "name a regular file (or a link to one)");
  }
  return stats;
}

function fileKind(stats: Stats): string {
  if (stats.isDirectory()) return "a directory";
  if (stats.isFIFO()) return "a named pipe (FIFO)";
  if (stats.isCharacterDevice()) return "a character device";
  if (stats.isBlockDevice()) return "a block device";
  if (stats.isSocket()) return "a socket";
  return "not a regular file";
}

function tooLarge(path: string, size: number, limit: number, what: string): InputError {
  return new InputError(
    `${what} is ${size.toLocaleString("en-US")} bytes, more than the limit of ${limit.toLocaleString("en-US")} bytes (${limit / 2 ** 20} MiB)`,
    { file: path },
    "check that this is the file you meant",
  );
}

/**
 * Reads many text files one after another (e.g. one matrix per subject) through
 * one reused byte buffer, giving for each the same string, or the same
 * InputError, as `readTextFile`. A file of ASCII bytes only (the usual numeric
 * matrix) becomes a string by taking its bytes as Latin-1, whose first 128 code
 * points are ASCII's, about twice as fast as decoding UTF-8 (measured on 400 ×
 * 400 matrices of 1.4 MB); any other file (a byte-order mark, any non-ASCII
 * byte, invalid UTF-8) is decoded as UTF-8 exactly as readFileSync does.
 * `readBytes` gives the bytes themselves, for a reader that decodes none.
 */
export class TextFileReader {
  private buffer: Buffer = Buffer.allocUnsafe(0);

  read(path: string, hint?: string): string {
    const bytes = this.readBytes(path, hint);
    try {
      return isAscii(bytes) ? bytes.toString("latin1") : bytes.toString("utf8");
    } catch (error) {
      throw cannotRead(path, error, hint); // a text longer than a string can be
    }
  }

  /**
   * The file's bytes, not decoded (for a reader of bytes such as
   * parseMatrixBytes): a view of the reused buffer, valid until the next read.
   * A missing or unreadable file, or one over 2 GiB, is the InputError `read` gives.
   */
  readBytes(path: string, hint?: string): Buffer {
    requireRegularFile(path, hint);
    try {
      const length = this.readWhole(path); // may replace this.buffer
      return this.buffer.subarray(0, length);
    } catch (error) {
      throw cannotRead(path, error, hint);
    }
  }

  /** Reads the file into `buffer` (grown as needed) to its end, whatever fstat says, and returns its length. */
  private readWhole(path: string): number {
    const fd = openSync(path, "r");
    try {
      const stats = fstatSync(fd);
      if (!stats.isFile()) throw new Error("not a regular file");
      const size = stats.size;
      // What readFileSync(path, "utf8") says of a file over 2 GiB (smaller ones fail alike when decoded).
      if (size > MAX_WHOLE_FILE_BYTES) {
        throw new Error(`Cannot create a string longer than 0x${constants.MAX_STRING_LENGTH.toString(16)} characters`);
      }
      // One byte more than the size, so that the read reaching the end is seen without growing the buffer.
      if (this.buffer.length < size + 1) this.buffer = Buffer.allocUnsafe(size + 1);
      let length = 0;
      for (;;) {
        if (length === this.buffer.length) {
          const grown = Buffer.allocUnsafe(2 * this.buffer.length + 4096);
          this.buffer.copy(grown, 0, 0, length);
          this.buffer = grown;
        }
        const got = readSync(fd, this.buffer, length, this.buffer.length - length, null);
        if (got === 0) return length;
        length += got;
      }
    } finally {
      closeSync(fd);
    }
  }
}

/**
 * A user's input file opened for reading pieces at given offsets, for files too
 * large to read whole (an .npy stack of several GiB). Failures of the operating
 * system are InputErrors as for `readTextFile`.
 */
export class InputFile {
  private constructor(
    readonly path: string,
    private readonly fd: number,
    /** Size in bytes when opened. */
    readonly size: number,
    private readonly hint: string | undefined,
  ) {}

  static open(path: string, hint?: string): InputFile {
    requireRegularFile(path, hint);
    let fd: number | undefined;
    try {
      fd = openSync(path, "r");
      const stats = fstatSync(fd);
      if (!stats.isFile()) throw new Error("not a regular file");
      return new InputFile(path, fd, stats.size, hint);
    } catch (error) {
      if (fd !== undefined) closeSync(fd);
      throw cannotRead(path, error, hint);
    }
  }

  /**
   * Fills `target` with the bytes from `position` on, stopping early only at the
   * end of the file; returns the number of bytes read.
   */
  readAt(target: Uint8Array, position: number): number {
    let done = 0;
    try {
      while (done < target.length) {
        // One read is limited to 2 GiB − 1 bytes; take at most 1 GiB at a time.
        const length = Math.min(target.length - done, 1 << 30);
        const got = readSync(this.fd, target, done, length, position + done);
        if (got === 0) break;
        done += got;
      }
    } catch (error) {
      throw cannotRead(this.path, error, this.hint);
    }
    return done;
  }

  close(): void {
    closeSync(this.fd);
  }
}

/** The largest file readFileSync reads whole: 2 GiB. */
const MAX_WHOLE_FILE_BYTES = 2 ** 31;

function cannotRead(path: string, error: unknown, hint?: string): InputError {
  return new InputError(`cannot read ${path}: ${systemReason(error)}`, { file: path }, hint);
}

/**
 * Node words system errors as `ENOENT: no such file or directory, open '/x'`;
 * keep the readable middle ("no such file or directory") and the code.
 */
export function systemReason(error: unknown): string {
  if (!(error instanceof Error)) return String(error);
  const code = (error as NodeJS.ErrnoException).code;
  let reason = error.message;
  if (code !== undefined && reason.startsWith(`${code}: `)) {
    reason = reason.slice(code.length + 2);
    const comma = reason.lastIndexOf(", ");
    if (comma > 0) reason = reason.slice(0, comma);
    return `${reason} (${code})`;
  }
  return reason;
}
