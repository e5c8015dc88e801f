// The format of an input file, from its first bytes (never from its name).

export type FileFormat = "npy" | "zip" | "mat5" | "mat73" | "hdf5" | "nifti2" | "nifti1" | "text";

/** How users know each format, for messages. */
export const FORMAT_NAMES: Record<FileFormat, string> = {
  npy: "a NumPy .npy array",
  zip: "a zip archive (NumPy .npz)",
  mat5: "a MATLAB .mat file (level 5, saved with -v6 or -v7)",
  mat73: "a MATLAB 7.3 .mat file (HDF5 inside)",
  hdf5: "an HDF5 file",
  nifti2: "a NIfTI-2 file (CIFTI-2)",
  nifti1: "a NIfTI-1 image",
  text: "text",
};

/** Bytes enough to tell every format apart (an HDF5 signature may sit at 0, 512, 1024 or 2048). */
export const FORMAT_PROBE_BYTES = 2056;

const HDF5_SIGNATURE = [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a];

function startsWith(bytes: Uint8Array, at: number, expected: readonly number[]): boolean {
  if (bytes.length < at + expected.length) return false;
  return expected.every((b, k) => bytes[at + k] === b);
}

function ascii(bytes: Uint8Array, from: number, to: number): string {
  return String.fromCharCode(...bytes.subarray(from, Math.min(to, bytes.length)));
}

function int32(bytes: Uint8Array, at: number, littleEndian: boolean): number {
  if (bytes.length < at + 4) return -1;
  return new DataView(bytes.buffer, bytes.byteOffset + at, 4).getInt32(0, littleEndian);
}

/**
 * The format the first bytes of a file say it is: NumPy's magic (\x93NUMPY),
 * a zip local header (PK\x03\x04), MATLAB's 128-byte text header ("MATLAB 5.0
 * MAT-file" with the endian indicator IM/MI at byte 126; "MATLAB 7.3" files are
 * HDF5 after a 512-byte user block), the HDF5 signature at 0, 512, 1024 or
 * 2048, a NIfTI-2 header (sizeof_hdr 540, magic "n+2") or NIfTI-1 (348,
 * "n+1"/"ni1"); anything else is read as text.
 */
export function detectFormat(bytes: Uint8Array): FileFormat {
  if (startsWith(bytes, 0, [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59])) return "npy";
  if (startsWith(bytes, 0, [0x50, 0x4b, 0x03, 0x04]) || startsWith(bytes, 0, [0x50, 0x4b, 0x05, 0x06])) return "zip";
  const head = ascii(bytes, 0, 116);
  if (head.startsWith("MATLAB 7.3 MAT-file")) return "mat73";
  if (head.startsWith("MATLAB") && bytes.length >= 128) {
    const indicator = ascii(bytes, 126, 128);
    if (indicator === "IM" || indicator === "MI") return "mat5";
  }
  for (const at of [0, 512, 1024, 2048]) if (startsWith(bytes, at, HDF5_SIGNATURE)) return "hdf5";
  for (const littleEndian of [true, false]) {
    if (int32(bytes, 0, littleEndian) === 540 && ascii(bytes, 4, 7) === "n+2") return "nifti2";
    if (int32(bytes, 0, littleEndian) === 348 && ["n+1", "ni1"].includes(ascii(bytes, 344, 347))) return "nifti1";
  }
  return "text";
}
