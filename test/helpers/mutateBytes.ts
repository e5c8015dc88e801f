/** One edit of a byte-mutation property test: set a byte, cut the bytes there, or insert a byte. */
export type ByteEdit = readonly ["set" | "cut" | "insert", number, number];

/** The bytes after the edits, in order (positions taken modulo the current length + 1); the input is not changed. */
export function mutateBytes(source: Uint8Array, edits: readonly ByteEdit[]): Uint8Array {
  let bytes = source.slice();
  for (const [kind, at, value] of edits) {
    const k = at % (bytes.length + 1);
    if (kind === "set" && k < bytes.length) bytes[k] = value;
    else if (kind === "cut") bytes = bytes.slice(0, k);
    else if (kind === "insert") {
      const grown = new Uint8Array(bytes.length + 1);
      grown.set(bytes.subarray(0, k));
      grown[k] = value;
      grown.set(bytes.subarray(k), k + 1);
      bytes = grown;
    }
  }
  return bytes;
}
