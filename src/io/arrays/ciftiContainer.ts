import { InputError } from "../../errors.js";
import { decodeNpyValues } from "../npy.js";
import { printable } from "../printable.js";
import type { ArrayContainer } from "./arrayContainer.js";
import { parseCiftiXml, type CiftiMap, type CiftiMatrix } from "./ciftiXml.js";
import { CIFTI_EXTENSION_CODE, niftiElementType, niftiExtension, readNifti2Header, type Nifti2Header } from "./nifti2Header.js";

// A CIFTI-2 parcellated connectivity file (.pconn.nii): a NIfTI-2 file whose
// header extension (code 32) holds the CIFTI-2 XML, with parcels along both
// matrix dimensions. It is one participant's N × N matrix, and the parcel
// names are its region labels.

const FORMAT = "CIFTI-2 parcellated connectivity";
const ONLY_PCONN = "plexus reads CIFTI-2 parcellated connectivity (.pconn.nii) only";
const PCONN_HINT = "give one parcels × parcels .pconn.nii per participant with a path template, e.g. connectomes: conn/{participant_id}.pconn.nii";
/** The largest matrix read, in values. */
const VALUE_LIMIT = 2 ** 28;

/** The CIFTI-2 intent codes (NIfTI intent_code 3000–3012): the kind of file each names and its usual file name ending. */
const CIFTI_INTENTS: Record<number, [string, string]> = {
  3000: ["file of unknown kind", ".nii"],
  3001: ["dense connectivity file", ".dconn.nii"],
  3002: ["dense time series file", ".dtseries.nii"],
  3003: ["parcellated connectivity file", ".pconn.nii"],
  3004: ["parcellated time series file", ".ptseries.nii"],
  3006: ["dense scalars file", ".dscalar.nii"],
  3007: ["dense labels file", ".dlabel.nii"],
  3008: ["parcellated scalars file", ".pscalar.nii"],
  3009: ["parcellated-dense connectivity file", ".pdconn.nii"],
  3010: ["dense-parcellated connectivity file", ".dpconn.nii"],
  3011: ["parcellated connectivity series file", ".pconnseries.nii"],
  3012: ["parcellated connectivity scalars file", ".pconnscalar.nii"],
};

/** "NIfTI intent 3002 ConnDenseSeries" */
function intentText(header: Nifti2Header): string {
  return `NIfTI intent ${header.intentCode}${header.intentName ? ` ${printable(header.intentName)}` : ""}`;
}

/** "dimension 0: series, dimension 1: brain models" */
function mapTypes(maps: readonly CiftiMap[], dimensions: number): string {
  if (dimensions < 1) return "no matrix dimensions";
  return Array.from({ length: dimensions }, (_, d) => {
    const map = maps.filter((m) => m.dimensions.includes(d));
    const type = map.length === 1 ? printable(map[0].type.replace(/^CIFTI_INDEX_TYPE_/, "").toLowerCase().replace(/_/g, " ")) : map.length === 0 ? "no map" : "several maps";
    return `dimension ${d}: ${type}`;
  }).join(", ");
}

/** "a CIFTI-2 dense time series file (.dtseries.nii; NIfTI intent 3002 ConnDenseSeries; dimension 0: series, dimension 1: brain models)" */
function describeCifti(header: Nifti2Header, matrix: CiftiMatrix): string {
  const known = CIFTI_INTENTS[header.intentCode];
  const details = `${intentText(header)}; ${mapTypes(matrix.maps, Math.max(0, header.dim[0] - 4))}`;
  return known ? `a CIFTI-2 ${known[0]} (${known[1]}; ${details})` : `a CIFTI file (${details})`;
}

function refuse(file: string, what: string): never {
  throw new InputError(`this file is ${what}; ${ONLY_PCONN}`, { file }, PCONN_HINT);
}

/** A NIfTI-1 image is no CIFTI-2 file: refused with what it is. */
export function niftiOneRefused(bytes: Uint8Array, file: string): ArrayContainer {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const littleEndian = view.getInt32(0, true) === 348;
  const rank = bytes.length >= 56 ? view.getInt16(40, littleEndian) : 0;
  const dims = rank >= 1 && rank <= 7 ? Array.from({ length: rank }, (_, k) => view.getInt16(42 + 2 * k, littleEndian)) : [];
  const intent = bytes.length >= 70 ? view.getInt16(68, littleEndian) : 0;
  return refuse(file, `a NIfTI-1 image (${dims.length > 0 ? `${dims.join(" × ")}, ` : ""}NIfTI intent ${intent}), not a CIFTI-2 file`);
}

/** The parcels along dimension `d`, from the one map that applies to it. */
function parcelsAlong(matrix: CiftiMatrix, d: number): string[] | undefined {
  const maps = matrix.maps.filter((m) => m.dimensions.includes(d));
  return maps.length === 1 ? maps[0].parcels : undefined;
}

function quoteList(names: readonly string[]): string {
  const shown = names.slice(0, 5).map((name) => `'${printable(name)}'`).join(", ");
  return names.length > 5 ? `${shown} and ${names.length - 5} more` : shown;
}

/**
 * A CIFTI-2 parcellated connectivity file as a container of one unnamed
 * N × N matrix, with the parcel names as its labels. Element (row r, column
 * c) of the CIFTI matrix is values[r·N + c]: dimension 0 (dim[5], "the number
 * of values in a row") runs along a row, so the NIfTI data (dim[5] fastest)
 * are already the rows one after another. Other CIFTI-2 kinds and NIfTI-2
 * files without CIFTI XML are refused by name.
 */
export function ciftiContainer(bytes: Uint8Array, file: string): ArrayContainer {
  const header = readNifti2Header(bytes, file);
  const extension = niftiExtension(bytes, header, CIFTI_EXTENSION_CODE, file);
  const rank = header.dim[0];
  if (!extension) {
    const dims = header.dim.slice(1, rank + 1).join(" × ") + ", ";
    refuse(file, `a NIfTI-2 image (${dims}${intentText(header)}) without the CIFTI-2 XML extension`);
  }
  let xml: string;
  try {
    xml = new TextDecoder("utf-8", { fatal: true }).decode(extension);
  } catch {
    throw new InputError("the CIFTI-2 XML in the header extension is not valid UTF-8 text", { file });
  }
  let end = xml.length;
  while (end > 0 && (xml[end - 1] === "\0" || /\s/.test(xml[end - 1]))) end--; // the extension is padded to a multiple of 16 bytes
  const matrix = parseCiftiXml(xml.slice(0, end), file);
  if (!/^2(\.0*)?$/.test(matrix.version.trim())) {
    refuse(file, `CIFTI version '${printable(matrix.version)}' (${intentText(header)}), not CIFTI-2`);
  }
  const dimensions = rank - 4;
  const rows = parcelsAlong(matrix, 1);
  const columns = parcelsAlong(matrix, 0);
  const parcelsBothWays = dimensions === 2 && rows !== undefined && columns !== undefined;
  if (header.intentCode === 3003 && !parcelsBothWays) {
    throw new InputError(
      `this file says it is CIFTI-2 parcellated connectivity (${intentText(header)}), but its matrix is not parcels × parcels (${mapTypes(matrix.maps, Math.max(0, dimensions))})`,
      { file },
    );
  }
  if (!parcelsBothWays || (header.intentCode !== 3003 && header.intentCode !== 3000)) refuse(file, describeCifti(header, matrix));

  if (header.dim.slice(1, 5).some((d) => d !== 1) || header.dim[5] !== columns.length || header.dim[6] !== rows.length) {
    throw new InputError(
      `the NIfTI dimensions (${header.dim.slice(1, rank + 1).join(" × ")}) do not match the CIFTI-2 maps: 1 × 1 × 1 × 1 × ${columns.length} × ${rows.length} expected from the parcels`,
      { file },
    );
  }
  if (rows.length !== columns.length || rows.some((name, k) => name !== columns[k])) {
    const k = rows.findIndex((name, i) => name !== columns[i]);
    throw new InputError(
      `the rows and columns of this parcellated connectivity matrix name different parcels ` +
        `(rows: ${quoteList(rows)}; columns: ${quoteList(columns)}${k >= 0 && k < columns.length ? `; first difference at position ${k + 1}` : ""}); ` +
        "plexus reads a square matrix whose rows and columns are the same parcels in the same order",
      { file },
    );
  }
  const seen = new Set<string>();
  const repeated = rows.find((name) => (seen.has(name) ? true : (seen.add(name), false)));
  if (repeated !== undefined) throw new InputError(`the parcel name '${printable(repeated)}' appears twice in the CIFTI-2 XML`, { file });

  const n = rows.length;
  const type = niftiElementType(header);
  if (!type) throw new InputError(`the data type (NIfTI datatype ${header.datatype}) is not one plexus reads (integers, float32, float64)`, { file });
  if (header.bitpix !== 8 * type.dtype.itemSize) {
    throw new InputError(`bitpix ${header.bitpix} does not match the datatype ${type.name} (${8 * type.dtype.itemSize} bits)`, { file });
  }
  const count = n * n;
  if (count > VALUE_LIMIT) throw new InputError(`a ${n} × ${n} matrix is more than plexus reads from one CIFTI-2 file (${VALUE_LIMIT} values)`, { file });
  const needed = count * type.dtype.itemSize;
  if (header.voxOffset < 544 || header.voxOffset + needed > bytes.length) {
    throw new InputError(
      header.voxOffset < 544
        ? `vox_offset ${header.voxOffset} lies inside the header (it must be at least 544)`
        : `truncated data: ${n} × ${n} ${type.name} values need ${needed} bytes from byte ${header.voxOffset}, but the file has ${bytes.length - header.voxOffset}`,
      { file },
    );
  }
  const scaled = Number.isFinite(header.sclSlope) && header.sclSlope !== 0 && !(header.sclSlope === 1 && (header.sclInter === 0 || !Number.isFinite(header.sclInter)));
  return {
    format: FORMAT,
    entries: [{ name: "", shape: [n, n], type: type.name, numeric: true }],
    labels: rows,
    read: () => {
      const values = new Float64Array(count);
      decodeNpyValues(bytes, header.voxOffset, count, type.dtype, values, 0);
      if (scaled) {
        const slope = header.sclSlope;
        const inter = Number.isFinite(header.sclInter) ? header.sclInter : 0;
        for (let k = 0; k < count; k++) values[k] = values[k] * slope + inter;
      }
      return { shape: [n, n], values };
    },
  };
}
