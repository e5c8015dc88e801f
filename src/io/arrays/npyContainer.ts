import { parseNpy, parseNpyHeader } from "../npy.js";
import type { ArrayContainer } from "./arrayContainer.js";

/** A .npy file as a container of one unnamed array (its values in C order, whatever the file's order). */
export function npyContainer(bytes: Uint8Array, file: string): ArrayContainer {
  const header = parseNpyHeader(bytes, file);
  return {
    format: "NumPy .npy",
    entries: [{ name: "", shape: header.shape, type: header.descr, numeric: true }],
    read: () => {
      const { shape, data } = parseNpy(bytes, file);
      return { shape, values: data };
    },
  };
}
