"""Writes the invented pre/post cohort of designs/prepost-group-by-time.yaml.

Run from the repository root with Debian's Python and numpy:
    /usr/bin/python3 demo-cohort/prepost/make_prepost.py

Twenty invented people in two arms (treated, waitlist), each scanned before
(pre) and after (post) an invented intervention; one person has no post scan.
Everything is invented: people, ages, region labels and coordinates. Each
scan's matrix is a correlation matrix built on the Fisher z scale:
z = person's own pattern + scan noise (+ a planted increase at post in the
treated arm on the edges among regions 1-5), written as r = tanh(z).
The output is the same on every run (fixed seed; numbers written with 6 decimals).
"""
import os
import numpy as np

SEED = 20261205
HERE = os.path.dirname(os.path.abspath(__file__))
REGIONS = 14
PEOPLE = 20
PLANTED = list(range(5))  # regions 1-5 (0-based 0..4)
EFFECT = 0.35             # planted increase in z at post, treated arm only

rng = np.random.default_rng(SEED)
labels = [f"{side}-fen-{k:02d}" for side in ("L", "R") for k in range(1, REGIONS // 2 + 1)]
coordinates = np.round(rng.uniform(-60, 60, size=(REGIONS, 3)), 1)
coordinates[: REGIONS // 2, 0] = -np.abs(coordinates[: REGIONS // 2, 0])
coordinates[REGIONS // 2 :, 0] = np.abs(coordinates[REGIONS // 2 :, 0])

os.makedirs(os.path.join(HERE, "connectomes"), exist_ok=True)
with open(os.path.join(HERE, "regions.tsv"), "w", encoding="utf-8", newline="\n") as f:
    f.write("label\tx\ty\tz\themisphere\n")
    for k, label in enumerate(labels):
        x, y, z = coordinates[k]
        f.write(f"{label}\t{x}\t{y}\t{z}\t{'left' if label.startswith('L') else 'right'}\n")

template = rng.normal(0.25, 0.15, size=(REGIONS, REGIONS))
template = (template + template.T) / 2
planted = np.zeros((REGIONS, REGIONS))
for a in PLANTED:
    for b in PLANTED:
        if a != b:
            planted[a, b] = EFFECT

rows = []
for p in range(1, PEOPLE + 1):
    person = f"p{p:02d}"
    arm = "treated" if p % 2 == 1 else "waitlist"
    age = int(rng.integers(24, 61))
    sex = "F" if rng.random() < 0.5 else "M"
    own = rng.normal(0, 0.12, size=(REGIONS, REGIONS))
    own = (own + own.T) / 2
    sessions = ["pre", "post"] if p != 14 else ["pre"]  # p14 has no post scan
    for session in sessions:
        noise = rng.normal(0, 0.10, size=(REGIONS, REGIONS))
        noise = (noise + noise.T) / 2
        z = template + own + noise + (planted if (arm == "treated" and session == "post") else 0)
        r = np.tanh(z)
        np.fill_diagonal(r, 1.0)
        np.savetxt(os.path.join(HERE, "connectomes", f"{person}_{session}.tsv"), r, fmt="%.6f", delimiter="\t")
        rows.append((f"{person}-{session}", person, session, arm, age, sex))

with open(os.path.join(HERE, "participants.tsv"), "w", encoding="utf-8", newline="\n") as f:
    f.write("participant_id\tperson\tsession\tarm\tage\tsex\n")
    for row in rows:
        f.write("\t".join(str(v) for v in row) + "\n")
print(f"numpy {np.__version__}: wrote {len(rows)} scans of {PEOPLE} people, {REGIONS} regions")
