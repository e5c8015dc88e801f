/**
 * Typed arrays over SharedArrayBuffers, handed to a worker thread as their
 * buffer, offset and length rather than as the views themselves: Node's
 * structured clone of a view wraps its byte length at 2^32 (on Node 20.20 a
 * Float64Array of 552,780,000 values, 4.42 GB, arrives with 15,909,088), while
 * the buffer itself arrives whole. `packSharedViews` replaces every such view
 * in plain objects and arrays by a marker; `unpackSharedViews`, in the worker,
 * makes the views again over the same memory (nothing is copied).
 */

interface SharedViewMarker {
  sharedView: ViewKind;
  buffer: SharedArrayBuffer;
  byteOffset: number;
  length: number;
}

const VIEW_KINDS = {
  Float64Array,
  Float32Array,
  Int32Array,
  Uint32Array,
  Int16Array,
  Uint16Array,
  Int8Array,
  Uint8Array,
  Uint8ClampedArray,
} as const;
type ViewKind = keyof typeof VIEW_KINDS;

function isPlainObject(value: object): boolean {
  const prototype = Object.getPrototypeOf(value);
  return prototype === Object.prototype || prototype === null;
}

function viewKind(value: ArrayBufferView): ViewKind | undefined {
  for (const kind of Object.keys(VIEW_KINDS) as ViewKind[]) {
    if (value instanceof VIEW_KINDS[kind]) return kind;
  }
  return undefined;
}

/** `value` with every view over shared memory (in plain objects and arrays, at any depth) replaced by a marker; other values as they are. */
export function packSharedViews(value: unknown): unknown {
  if (value === null || typeof value !== "object") return value;
  if (ArrayBuffer.isView(value)) {
    const kind = viewKind(value);
    if (kind === undefined || !(value.buffer instanceof SharedArrayBuffer)) return value;
    const marker: SharedViewMarker = {
      sharedView: kind,
      buffer: value.buffer,
      byteOffset: value.byteOffset,
      length: (value as unknown as { length: number }).length,
    };
    return marker;
  }
  if (Array.isArray(value)) return value.map(packSharedViews);
  if (!isPlainObject(value)) return value;
  const out: Record<string, unknown> = {};
  for (const [key, entry] of Object.entries(value)) out[key] = packSharedViews(entry);
  return out;
}

function isMarker(value: object): value is SharedViewMarker {
  const marker = value as Partial<SharedViewMarker>;
  return typeof marker.sharedView === "string" && marker.buffer instanceof SharedArrayBuffer && Object.keys(value).length === 4;
}

/** The inverse of packSharedViews: views over the same shared memory. */
export function unpackSharedViews<T>(value: unknown): T {
  return unpack(value) as T;
}

function unpack(value: unknown): unknown {
  if (value === null || typeof value !== "object" || ArrayBuffer.isView(value)) return value;
  if (Array.isArray(value)) return value.map(unpack);
  if (!isPlainObject(value)) return value;
  if (isMarker(value)) {
    const View = VIEW_KINDS[value.sharedView] as unknown as new (buffer: SharedArrayBuffer, byteOffset: number, length: number) => ArrayBufferView;
    return new View(value.buffer, value.byteOffset, value.length);
  }
  const out: Record<string, unknown> = {};
  for (const [key, entry] of Object.entries(value)) out[key] = unpack(entry);
  return out;
}
