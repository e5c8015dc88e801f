"""Writes the demo cohort's matrices in the file formats other tools write, for
the worked designs in ../../designs/ (clinic-from-*.yaml).

Run with Debian's Python and its packages (python3-numpy, python3-scipy,
python3-nibabel), from anywhere:  /usr/bin/python3 demo-cohort/formats/make_formats.py

Everything here is the invented demo cohort of ../ (its text matrices, read
back exactly: every value is a decimal of at most six places, stored as the
nearest double), written three more ways:
  connectomes.mat          one MATLAB level-5 file (scipy.io.savemat, compressed):
                           variable `conn`, 60 × 60 × 60 with participants on the
                           LAST axis, in the participants table's row order
  labelled/<id>.csv        one CSV per participant, as a data-frame library writes
                           it: a header row of region labels after an empty corner
                           cell, then one row per region starting with its label;
                           regions in alphabetical order of label (not the regions
                           table's order), written with Python's csv module
  pconn/<id>.pconn.nii     one CIFTI-2 parcellated connectivity file per
                           participant (nibabel), float64, the parcel names being
                           the demo's invented region labels
The versions of the writers are recorded in versions.json.
"""
import csv
import json
import os
import sys

import nibabel
import numpy as np
import scipy
import scipy.io
from nibabel import cifti2
from nibabel.cifti2 import cifti2_axes

HERE = os.path.dirname(os.path.abspath(__file__))
COHORT = os.path.dirname(HERE)


def main():
    with open(os.path.join(COHORT, "participants.tsv"), newline="") as f:
        ids = [row["participant_id"] for row in csv.DictReader(f, delimiter="\t")]
    with open(os.path.join(COHORT, "regions.tsv"), newline="") as f:
        labels = [row["label"] for row in csv.DictReader(f, delimiter="\t")]
    matrices = [np.loadtxt(os.path.join(COHORT, "connectomes", f"{pid}.tsv"), delimiter="\t") for pid in ids]

    scipy.io.savemat(os.path.join(HERE, "connectomes.mat"), {"conn": np.stack(matrices, axis=2)}, do_compression=True)

    order = sorted(range(len(labels)), key=lambda k: labels[k])
    os.makedirs(os.path.join(HERE, "labelled"), exist_ok=True)
    for pid, m in zip(ids, matrices):
        with open(os.path.join(HERE, "labelled", f"{pid}.csv"), "w", newline="") as f:
            out = csv.writer(f)
            out.writerow([""] + [labels[k] for k in order])
            for a in order:
                out.writerow([labels[a]] + [format_value(m[a, b]) for b in order])

    parcels = cifti2_axes.ParcelsAxis(
        name=labels,
        voxels=[np.zeros((0, 3), dtype=int) for _ in labels],
        vertices=[{"CIFTI_STRUCTURE_CORTEX_LEFT": np.array([k])} for k in range(len(labels))],
        affine=np.eye(4),
        volume_shape=(1, 1, 1),
        nvertices={"CIFTI_STRUCTURE_CORTEX_LEFT": len(labels)},
    )
    os.makedirs(os.path.join(HERE, "pconn"), exist_ok=True)
    for pid, m in zip(ids, matrices):
        image = cifti2.Cifti2Image(m.astype(np.float64), header=(parcels, parcels))
        image.nifti_header.set_intent("ConnParcels")
        image.to_filename(os.path.join(HERE, "pconn", f"{pid}.pconn.nii"))

    with open(os.path.join(HERE, "versions.json"), "w") as f:
        json.dump({"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__, "nibabel": nibabel.__version__}, f, indent=2)
        f.write("\n")


def format_value(value):
    """The text matrices' own decimal (at most six places), so the CSV holds the same doubles."""
    text = f"{value:.6f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


if __name__ == "__main__":
    main()
