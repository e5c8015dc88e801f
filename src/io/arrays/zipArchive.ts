import { Inflate, inflateSync } from "fflate";
import { InputError } from "../../errors.js";
import { printable } from "../printable.js";

/**
 * The members of a zip archive and their contents. The layout is the zip
 * format's (PKWARE APPNOTE.TXT 6.3: end of central directory record, its
 * zip64 form, central directory headers with the zip64 extra field 0x0001,
 * local file headers); DEFLATE is decoded by fflate. The central directory is
 * read here, not by fflate, because a member's bytes must be found without
 * inflating it: the NumPy reader inflates only a member's header to list the
 * arrays, and a member's data only when it is read.
 */
export interface ZipMember {
  name: string;
  /** 0 stored, 8 deflated; others are refused when the member is read. */
  method: number;
  /** General purpose flags (bit 0: encrypted). */
  flags: number;
  crc32: number;
  compressedSize: number;
  /** The uncompressed size the central directory declares. */
  size: number;
  /** Offset of the member's stored or compressed bytes in the archive. */
  dataOffset: number;
}

const END_OF_DIRECTORY = 0x06054b50;
const ZIP64_LOCATOR = 0x07064b50;
const ZIP64_END_OF_DIRECTORY = 0x06064b50;
const DIRECTORY_HEADER = 0x02014b50;
const LOCAL_HEADER = 0x04034b50;
const ZIP64_EXTRA = 0x0001;
const UNKNOWN32 = 0xffffffff;

function fail(file: string, what: string): never {
  throw new InputError(`not a readable zip archive: ${what}`, { file });
}

/** Every member of the archive, in central directory order; a damaged directory is an InputError naming the file. */
export function zipMembers(bytes: Uint8Array, file: string): ZipMember[] {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const u16 = (at: number): number => view.getUint16(at, true);
  const u32 = (at: number): number => view.getUint32(at, true);
  const u64 = (at: number): number => {
    const value = view.getBigUint64(at, true);
    return value > BigInt(Number.MAX_SAFE_INTEGER) ? Infinity : Number(value);
  };
  const inside = (at: number, length: number): boolean => at >= 0 && length >= 0 && at + length <= bytes.length;

  // The end of central directory record: the last 22 bytes, or earlier when a comment (up to 65535 bytes) follows it.
  let end = -1;
  for (let at = bytes.length - 22; at >= Math.max(0, bytes.length - 22 - 0xffff); at--) {
    if (u32(at) === END_OF_DIRECTORY && at + 22 + u16(at + 20) === bytes.length) {
      end = at;
      break;
    }
  }
  if (end < 0) fail(file, `no end of central directory record (the archive is truncated or damaged; ${bytes.length} bytes)`);
  if (u16(end + 4) !== 0 || u16(end + 6) !== 0) fail(file, "the archive spans several disks");
  let count = u16(end + 10);
  let directorySize = u32(end + 12);
  let directoryOffset = u32(end + 16);
  if (end >= 20 && u32(end - 20) === ZIP64_LOCATOR) {
    const at = u64(end - 12);
    if (!inside(at, 56) || u32(at) !== ZIP64_END_OF_DIRECTORY) fail(file, "the zip64 end of central directory record is missing");
    count = u64(at + 32);
    directorySize = u64(at + 40);
    directoryOffset = u64(at + 48);
  }
  if (!inside(directoryOffset, directorySize)) fail(file, "the central directory lies beyond the end of the file (the archive is truncated)");

  const members: ZipMember[] = [];
  let at = directoryOffset;
  for (let k = 0; k < count; k++) {
    if (!inside(at, 46) || u32(at) !== DIRECTORY_HEADER) fail(file, `central directory entry ${k + 1} of ${count} is damaged`);
    const flags = u16(at + 8);
    const nameLength = u16(at + 28);
    const extraLength = u16(at + 30);
    const commentLength = u16(at + 32);
    const next = at + 46 + nameLength + extraLength + commentLength;
    if (!inside(at, next - at)) fail(file, `central directory entry ${k + 1} of ${count} runs past the end of the file`);
    const name = new TextDecoder(flags & 0x0800 ? "utf-8" : "latin1").decode(bytes.subarray(at + 46, at + 46 + nameLength));
    let size = u32(at + 24);
    let compressedSize = u32(at + 20);
    let localOffset = u32(at + 42);
    if (size === UNKNOWN32 || compressedSize === UNKNOWN32 || localOffset === UNKNOWN32) {
      // The zip64 extra field holds, in this order, only the values whose 32-bit field is 0xFFFFFFFF.
      let field = at + 46 + nameLength;
      const fieldsEnd = field + extraLength;
      let found = false;
      while (field + 4 <= fieldsEnd) {
        const id = u16(field);
        const length = u16(field + 2);
        if (id === ZIP64_EXTRA) {
          let value = field + 4;
          const take = (): number => {
            if (value + 8 > field + 4 + length) fail(file, `member '${printable(name)}' has a short zip64 field`);
            const v = u64(value);
            value += 8;
            return v;
          };
          if (size === UNKNOWN32) size = take();
          if (compressedSize === UNKNOWN32) compressedSize = take();
          if (localOffset === UNKNOWN32) localOffset = take();
          found = true;
          break;
        }
        field += 4 + length;
      }
      if (!found) fail(file, `member '${printable(name)}' declares zip64 sizes but has no zip64 field`);
    }
    if (!inside(localOffset, 30) || u32(localOffset) !== LOCAL_HEADER) fail(file, `the local header of member '${printable(name)}' is missing (the archive is truncated or damaged)`);
    const dataOffset = localOffset + 30 + u16(localOffset + 26) + u16(localOffset + 28);
    if (!inside(dataOffset, compressedSize)) fail(file, `member '${printable(name)}' runs past the end of the file (the archive is truncated)`);
    members.push({ name, method: u16(at + 10), flags, crc32: u32(at + 16), compressedSize, size, dataOffset });
    at = next;
  }
  return members;
}

/** Why a member cannot be inflated here (encrypted, or a method other than stored and deflated); undefined when it can. */
function unreadable(member: ZipMember): string | undefined {
  if (member.flags & 0x0001) return "it is encrypted";
  if (member.method !== 0 && member.method !== 8) return `it is compressed with method ${member.method} (only stored and deflated members are read)`;
  return undefined;
}

/** An error fflate raises on damaged DEFLATE data (it carries a numeric code), or a write past the fixed output. */
function isInflateError(error: unknown): error is Error {
  return error instanceof RangeError || (error instanceof Error && typeof (error as { code?: unknown }).code === "number");
}

function memberError(file: string, member: ZipMember, what: string): InputError {
  return new InputError(`member '${printable(member.name)}' of the zip archive cannot be read: ${what}`, { file });
}

/**
 * The first `count` bytes of a member (fewer when it is shorter), inflating
 * only as much of a deflated member as they need.
 */
export function memberPrefix(bytes: Uint8Array, member: ZipMember, count: number, file: string): Uint8Array {
  const problem = unreadable(member);
  if (problem) throw memberError(file, member, problem);
  const compressed = bytes.subarray(member.dataOffset, member.dataOffset + member.compressedSize);
  if (member.method === 0) return compressed.subarray(0, Math.min(count, compressed.length));
  const out = new Uint8Array(count);
  let filled = 0;
  const inflate = new Inflate((chunk) => {
    const take = Math.min(chunk.length, count - filled);
    out.set(chunk.subarray(0, take), filled);
    filled += take;
  });
  const step = 4096;
  try {
    for (let at = 0; at < compressed.length && filled < count; at += step) {
      inflate.push(compressed.subarray(at, at + step), at + step >= compressed.length);
    }
  } catch (error) {
    if (!isInflateError(error)) throw error;
    throw memberError(file, member, `damaged compressed data (${error.message})`);
  }
  return out.subarray(0, filled);
}

/**
 * A member's whole content: exactly the size the central directory declares,
 * inflated into an output of that size (so a member cannot inflate beyond it:
 * callers check the declared size before asking), with its CRC-32 checked.
 */
export function memberContent(bytes: Uint8Array, member: ZipMember, file: string): Uint8Array {
  const problem = unreadable(member);
  if (problem) throw memberError(file, member, problem);
  const compressed = bytes.subarray(member.dataOffset, member.dataOffset + member.compressedSize);
  let content: Uint8Array;
  if (member.method === 0) {
    if (compressed.length !== member.size) throw memberError(file, member, `it is stored with ${compressed.length} bytes but declares ${member.size}`);
    content = compressed;
  } else {
    if (compressed.length === 0 && member.size > 0) throw memberError(file, member, `it holds no compressed data but declares ${member.size} bytes (truncated)`);
    try {
      content = inflateSync(compressed, { out: new Uint8Array(member.size) });
    } catch (error) {
      if (!isInflateError(error)) throw error;
      throw memberError(file, member, `damaged compressed data (${error.message})`);
    }
    if (content.length !== member.size) throw memberError(file, member, `it inflates to ${content.length} bytes but declares ${member.size} (truncated)`);
  }
  if (crc32(content) !== member.crc32) throw memberError(file, member, "its checksum (CRC-32) does not match: the archive is damaged");
  return content;
}

let crcTable: Uint32Array | undefined;

/** CRC-32 of the zip format (APPNOTE.TXT 4.4.7: the reflected polynomial 0xEDB88320, initial and final XOR 0xFFFFFFFF). */
function crc32(data: Uint8Array): number {
  if (!crcTable) {
    crcTable = new Uint32Array(256);
    for (let n = 0; n < 256; n++) {
      let c = n;
      for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
      crcTable[n] = c >>> 0;
    }
  }
  let crc = 0xffffffff;
  for (let k = 0; k < data.length; k++) crc = crcTable[(crc ^ data[k]) & 0xff] ^ (crc >>> 8);
  return (crc ^ 0xffffffff) >>> 0;
}
