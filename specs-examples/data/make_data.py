"""Writes the invented demo datasets of specs-examples/data/.

Every scenario here is made up for the examples (no real study, no real people). The numbers
come from a fixed-seed generator so the files are reproducible: run
`python3 specs-examples/data/make_data.py` from the repository root to write them again.
"""

import csv
import math
import os
import random

HERE = os.path.dirname(os.path.abspath(__file__))


def write(name, header, rows, delimiter=","):
    with open(os.path.join(HERE, name), "w", newline="", encoding="utf-8") as f:
        w = csv.writer(f, delimiter=delimiter, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)


def reading(rng):
    """A reading study: 24 readers, paper and screen, morning and evening sessions."""
    rows = []
    for p in range(1, 25):
        base = rng.gauss(235, 35)
        age = rng.randint(19, 64)
        for medium, shift in (("paper", 0.0), ("screen", -14.0)):
            for session, s_shift in (("morning", 6.0), ("evening", -6.0)):
                speed = base + shift + s_shift + rng.gauss(0, 9)
                comfort = min(5, max(1, round(3.4 + (0.6 if medium == "paper" else -0.5) + rng.gauss(0, 0.9))))
                speed_text = f"{speed:.1f}"
                if p == 7 and medium == "screen" and session == "evening":
                    speed_text = "NA"
                rows.append([f"R{p:02d}", medium, session, speed_text, comfort, age])
    write("reading.csv", ["participant", "medium", "session", "speed", "comfort", "Age (years)"], rows)


def seedlings(rng):
    """Seedlings grown in trays under three light levels (one tray = one unit)."""
    rows = []
    tray = 0
    for light, mu in (("shade", 38.0), ("partial", 52.0), ("full", 61.0)):
        for _ in range(20):
            tray += 1
            height = max(2.0, rng.gauss(mu, 9.0))
            if tray == 17:
                height = 88.5
            rows.append([f"T{tray:03d}", light, f"{height:.1f}"])
    write("seedlings.csv", ["tray", "light", "height"], rows)


def commute(rng):
    """A commute survey: mode of travel and satisfaction."""
    modes = ["walk", "cycle", "bus", "train", "car"]
    weights = [0.14, 0.22, 0.25, 0.17, 0.22]
    sat_by_mode = {"walk": 0.7, "cycle": 0.8, "bus": -0.5, "train": 0.1, "car": -0.1}
    rows = []
    for r in range(1, 181):
        mode = rng.choices(modes, weights)[0]
        z = sat_by_mode[mode] + rng.gauss(0, 0.9)
        sat = "low" if z < -0.4 else ("medium" if z < 0.6 else "high")
        minutes = max(3, round(rng.lognormvariate(math.log(24), 0.55)))
        if r % 37 == 0:
            sat = "-"
        rows.append([f"C{r:03d}", mode, sat, minutes])
    write("commute.tsv", ["respondent", "mode", "satisfaction", "minutes"], rows, delimiter="\t")


def plots(rng):
    """Field plots: soil temperature (interval, deg C) and beetle counts under two mulches."""
    rows = []
    for i in range(1, 41):
        mulch = "straw" if i % 2 else "bark"
        temp = rng.gauss(14.5 if mulch == "straw" else 13.2, 1.6)
        beetles = max(0, round(rng.gauss(22 if mulch == "straw" else 15, 5)))
        rows.append([f"P{i:02d}", mulch, f"{temp:.2f}", beetles])
    write("plots.csv", ["plot", "mulch", "soil_temp", "beetles"], rows)


def main():
    rng = random.Random(20261202)
    reading(rng)
    seedlings(rng)
    commute(rng)
    plots(rng)


if __name__ == "__main__":
    main()
