// The data types and array classes of MATLAB level-5 .mat files, as numbered in
// "MATLAB MAT-File Format" (The MathWorks), the chapter on Level 5 MAT-files.

/** Data types of data elements (the first word of a tag). */
export const MI_INT8 = 1;
export const MI_UINT8 = 2;
export const MI_INT16 = 3;
export const MI_UINT16 = 4;
export const MI_INT32 = 5;
export const MI_UINT32 = 6;
export const MI_SINGLE = 7;
export const MI_DOUBLE = 9;
export const MI_INT64 = 12;
export const MI_UINT64 = 13;
export const MI_MATRIX = 14;
export const MI_COMPRESSED = 15;
export const MI_UTF8 = 16;

/** Bytes per value of the data types that hold numbers. */
export const NUMBER_TYPE_BYTES: Readonly<Record<number, number>> = {
  [MI_INT8]: 1,
  [MI_UINT8]: 1,
  [MI_INT16]: 2,
  [MI_UINT16]: 2,
  [MI_INT32]: 4,
  [MI_UINT32]: 4,
  [MI_SINGLE]: 4,
  [MI_DOUBLE]: 8,
  [MI_INT64]: 8,
  [MI_UINT64]: 8,
};

/** Array classes (the low byte of an array's flags word). */
export const MX_SPARSE = 5;
export const MX_OPAQUE = 17;

/** MATLAB's name of each class; classes 6 … 15 hold numbers. */
export const CLASS_NAMES: Readonly<Record<number, string>> = {
  1: "cell",
  2: "struct",
  3: "object",
  4: "char",
  5: "sparse",
  6: "double",
  7: "single",
  8: "int8",
  9: "uint8",
  10: "int16",
  11: "uint16",
  12: "int32",
  13: "uint32",
  14: "int64",
  15: "uint64",
  16: "function handle",
  17: "object",
};

export function isNumericClass(mclass: number): boolean {
  return mclass >= 6 && mclass <= 15;
}

/** Bits of the flags byte (the second byte of the flags word). */
export const FLAG_COMPLEX = 0x08;
export const FLAG_LOGICAL = 0x02;
