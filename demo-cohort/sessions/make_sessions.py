"""Writes the invented three-session cohort of designs/three-sessions.yaml.

Run from the repository root with Debian's Python and numpy:
    /usr/bin/python3 demo-cohort/sessions/make_sessions.py

Sixteen invented people scanned three times (baseline, week6, week12) in an
invented training study; person t07 missed week12 (kept: two scans) and t12
has only a baseline scan (left out: one scan only). Everything is invented:
people, ages, region labels and coordinates. Each scan's matrix is a
correlation matrix built on the Fisher z scale: z = person's own pattern +
scan noise + a planted rise over the sessions (0, half, full) on the edges
among regions 1-4, written as r = tanh(z). The same output on every run
(fixed seed; numbers written with 6 decimals).
"""
import os
import numpy as np

SEED = 20261207
HERE = os.path.dirname(os.path.abspath(__file__))
REGIONS = 12
PEOPLE = 16
SESSIONS = ["baseline", "week6", "week12"]
RISE = {"baseline": 0.0, "week6": 0.15, "week12": 0.3}
PLANTED = list(range(4))

rng = np.random.default_rng(SEED)
labels = [f"{side}-lode-{k:02d}" for side in ("L", "R") for k in range(1, REGIONS // 2 + 1)]
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
            planted[a, b] = 1.0

rows = []
for p in range(1, PEOPLE + 1):
    person = f"t{p:02d}"
    age = int(rng.integers(20, 66))
    own = rng.normal(0, 0.12, size=(REGIONS, REGIONS))
    own = (own + own.T) / 2
    sessions = SESSIONS[:2] if p == 7 else SESSIONS[:1] if p == 12 else SESSIONS
    for session in sessions:
        noise = rng.normal(0, 0.10, size=(REGIONS, REGIONS))
        noise = (noise + noise.T) / 2
        r = np.tanh(template + own + noise + RISE[session] * planted)
        np.fill_diagonal(r, 1.0)
        np.savetxt(os.path.join(HERE, "connectomes", f"{person}_{session}.tsv"), r, fmt="%.6f", delimiter="\t")
        rows.append((f"{person}-{session}", person, session, age))

with open(os.path.join(HERE, "participants.tsv"), "w", encoding="utf-8", newline="\n") as f:
    f.write("participant_id\tperson\tsession\tage\n")
    for row in rows:
        f.write("\t".join(str(v) for v in row) + "\n")
print(f"numpy {np.__version__}: wrote {len(rows)} scans of {PEOPLE} people, {REGIONS} regions")
