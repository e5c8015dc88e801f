import { InputError } from "../../errors.js";
import type { ArrayContainer } from "./arrayContainer.js";
import { ciftiContainer, niftiOneRefused } from "./ciftiContainer.js";
import { FORMAT_NAMES, type FileFormat } from "./fileFormat.js";
import { mat5Container } from "./mat5Container.js";
import { hdf5Container, matlab73Container } from "./hdf5Container.js";
import { npyContainer } from "./npyContainer.js";
import { npzContainer } from "./npzContainer.js";

type ContainerReader = (bytes: Uint8Array, file: string) => ArrayContainer;

/** The reader of each binary format; a format without one is refused by name. */
const READERS: Partial<Record<FileFormat, ContainerReader>> = {
  npy: npyContainer,
  mat5: mat5Container,
  zip: npzContainer,
  nifti2: ciftiContainer,
  nifti1: niftiOneRefused,
  hdf5: hdf5Container,
  mat73: matlab73Container,
};

/** Opens a binary input whose bytes say it is `format`. */
export function openContainer(bytes: Uint8Array, file: string, format: FileFormat): ArrayContainer {
  const reader = READERS[format];
  if (!reader) {
    throw new InputError(
      `this file is ${FORMAT_NAMES[format]}, which plexus does not read as connectivity matrices`,
      { file },
      "save the matrices as text, .npy, .npz, MATLAB .mat, HDF5 or CIFTI-2 .pconn.nii (see the README's Inputs section)",
    );
  }
  return reader(bytes, file);
}
