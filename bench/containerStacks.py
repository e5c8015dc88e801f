"""Writes the bench's .npy stack again as a MATLAB .mat file and an HDF5 file, for the
input-reading rows (bench/run.ts). Needs NumPy, SciPy and h5py (Debian's python3-scipy
and python3-h5py; bench/run.ts tries /usr/bin/python3, then python3).

  python3 containerStacks.py FOLDER     reads FOLDER/connectomes.npy (S × N × N) and writes
    FOLDER/connectomes.mat  variable `conn`, N × N × S (participants on the last axis, as a
                            MATLAB user stacks them), level 5, uncompressed (scipy.io.savemat)
    FOLDER/connectomes.h5   dataset /conn, S × N × N, float64, contiguous (h5py)
and prints the writers' versions as JSON.
"""
import json
import os
import sys

import h5py
import numpy as np
import scipy
import scipy.io

folder = sys.argv[1]
stack = np.load(os.path.join(folder, "connectomes.npy"), mmap_mode="r")
scipy.io.savemat(os.path.join(folder, "connectomes.mat"), {"conn": np.ascontiguousarray(np.moveaxis(stack, 0, 2))}, do_compression=False)
with h5py.File(os.path.join(folder, "connectomes.h5"), "w") as f:
    f.create_dataset("conn", data=stack)
print(json.dumps({"numpy": np.__version__, "scipy": scipy.__version__, "h5py": h5py.__version__, "hdf5": h5py.version.hdf5_version}))
