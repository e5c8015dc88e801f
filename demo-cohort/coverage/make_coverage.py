"""Writes a small invented cohort with incomplete coverage, for the worked designs
../../designs/coverage-gaps.yaml and ../../designs/streamline-counts.yaml.

Run with Debian's Python and numpy, from anywhere:
    /usr/bin/python3 demo-cohort/coverage/make_coverage.py
The seed is fixed, so the files are the same on every run (numpy's version is
recorded in versions.json).

Everything is invented: 30 participants (15 patients, 15 controls, ages 40-75)
and 20 regions with made-up labels and coordinates ("crest" and "vale" regions
in two made-up systems). Two kinds of matrices, one text file per participant:
  gaps/<id>.tsv    correlations (test them with transform: fisher-z). Three
                   participants have no signal in region V-vale-04 (its row and
                   column are nan), and one more lacks region C-crest-07 in a
                   single cell pair; patients are higher than controls on the
                   edges among regions 1-5 (Cohen's d about 1.5 on the z scale).
  counts/<id>.tsv  streamline counts: whole numbers with many zeros (the weaker
                   connections are often not found), each participant's total
                   scaled by a random "tracking yield" factor, and patients with
                   about 2.5 times the count on the edges among regions 1-5.
"""
import json
import os

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
RNG = np.random.default_rng(20261205)
N_REGIONS = 20
N_PATIENTS = 15
N_CONTROLS = 15
EFFECT_REGIONS = 5

labels = [f"C-crest-{k + 1:02d}" for k in range(10)] + [f"V-vale-{k + 1:02d}" for k in range(10)]
systems = ["north"] * 5 + ["south"] * 5 + ["north"] * 5 + ["south"] * 5


def write_table(path, header, rows):
    with open(path, "w", encoding="utf-8", newline="") as f:
        f.write("\t".join(header) + "\n")
        for row in rows:
            f.write("\t".join(str(v) for v in row) + "\n")


def cell(value):
    return "nan" if np.isnan(value) else f"{value:.6f}".rstrip("0").rstrip(".") if value != 0 else "0"


def write_matrix(path, matrix):
    with open(path, "w", encoding="utf-8", newline="") as f:
        for row in matrix:
            f.write("\t".join(cell(v) for v in row) + "\n")


# Regions: invented coordinates on an ellipse per hemisphere.
region_rows = []
for k, label in enumerate(labels):
    hemisphere = "left" if k % 2 == 0 else "right"
    angle = 2 * np.pi * (k // 2) / 10
    x = (-1 if hemisphere == "left" else 1) * round(30 + 10 * np.cos(angle), 1)
    y = round(60 * np.sin(angle), 1)
    z = round(20 + 15 * np.cos(2 * angle), 1)
    region_rows.append([label, x, y, z, hemisphere, systems[k]])
write_table(os.path.join(HERE, "regions.tsv"), ["label", "x", "y", "z", "hemisphere", "system"], region_rows)

# Participants.
S = N_PATIENTS + N_CONTROLS
ids = [f"sub-{s + 1:02d}" for s in range(S)]
group = ["patient" if s % 2 == 0 else "control" for s in range(S)]
age = RNG.integers(40, 76, size=S)
sex = RNG.choice(["F", "M"], size=S)
write_table(
    os.path.join(HERE, "participants.tsv"),
    ["participant_id", "group", "age", "sex"],
    [[ids[s], group[s], int(age[s]), sex[s]] for s in range(S)],
)

iu = np.triu_indices(N_REGIONS, 1)
effect = np.zeros((N_REGIONS, N_REGIONS), dtype=bool)
effect[:EFFECT_REGIONS, :EFFECT_REGIONS] = True
np.fill_diagonal(effect, False)

# Correlation matrices with gaps.
os.makedirs(os.path.join(HERE, "gaps"), exist_ok=True)
base = RNG.normal(0.3, 0.15, size=(N_REGIONS, N_REGIONS))
base = (base + base.T) / 2
no_signal = {ids[3]: "V-vale-04", ids[10]: "V-vale-04", ids[21]: "V-vale-04"}
one_cell = {ids[16]: ("C-crest-07", "V-vale-09")}
for s in range(S):
    z = np.arctanh(np.clip(base, -0.9, 0.9)) + RNG.normal(0, 0.15, size=(N_REGIONS, N_REGIONS))
    z = (z + z.T) / 2
    if group[s] == "patient":
        z[effect] += 0.15 * 1.5
    r = np.tanh(z)
    np.fill_diagonal(r, 1.0)
    r = np.round(r, 6)
    if ids[s] in no_signal:
        k = labels.index(no_signal[ids[s]])
        r[k, :] = np.nan
        r[:, k] = np.nan
    if ids[s] in one_cell:
        a, b = (labels.index(x) for x in one_cell[ids[s]])
        r[a, b] = r[b, a] = np.nan
    write_matrix(os.path.join(HERE, "gaps", f"{ids[s]}.tsv"), r)

# Streamline counts with many zeros.
os.makedirs(os.path.join(HERE, "counts"), exist_ok=True)
# Each edge's typical count (log-normal) and how often tracking finds it at all.
typical = np.exp(RNG.normal(3.0, 1.2, size=(N_REGIONS, N_REGIONS)))
typical = (typical + typical.T) / 2
found = RNG.uniform(0.55, 1.0, size=(N_REGIONS, N_REGIONS))
found[effect] = 0.95
for s in range(S):
    yield_factor = RNG.uniform(0.6, 1.6)
    mean = typical * yield_factor
    if group[s] == "patient":
        mean = np.where(effect, mean * 2.5, mean)
    counts = RNG.poisson(mean * RNG.gamma(8.0, 1 / 8.0, size=mean.shape))
    present = RNG.uniform(size=mean.shape) < found
    counts = np.where(present, counts, 0).astype(float)
    upper = np.triu(counts, 1)
    counts = upper + upper.T
    write_matrix(os.path.join(HERE, "counts", f"{ids[s]}.tsv"), counts)

with open(os.path.join(HERE, "versions.json"), "w", encoding="utf-8") as f:
    json.dump({"numpy": np.__version__, "seed": 20261205}, f, indent=2)
    f.write("\n")
