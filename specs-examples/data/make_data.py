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


def clinic(rng):
    """A clinic follow-up: 64 patients in two arms, symptom severity at four visits.

    Severity tends to ease over the visits, more so under the exercise programme. A few
    patients miss a visit, and one severity was not recorded.
    """
    levels = ["none", "mild", "moderate", "severe"]
    visits = ["baseline", "week 4", "week 12", "week 26"]
    rows = []
    for p in range(1, 65):
        arm = "exercise" if p % 2 else "usual care"
        state = rng.choices([1, 2, 3], [0.3, 0.45, 0.25])[0]
        ease = 0.35 if arm == "exercise" else 0.2
        for v, visit in enumerate(visits):
            if v > 0:
                u = rng.random()
                if u < ease and state > 0:
                    state -= 1
                elif u > 0.9 and state < 3:
                    state += 1
            if (p, v) in ((9, 2), (23, 3), (40, 1), (51, 3)):
                continue
            severity = levels[state]
            if (p, v) == (31, 2):
                severity = ""
            rows.append([f"P{p:03d}", arm, visit, severity])
    write("clinic.csv", ["patient", "arm", "visit", "severity"], rows)


def responses(rng):
    """A response-time task: 28 participants, three cue conditions, three sessions, six trials each.

    Times are right-skewed (log-normal); participants differ in speed and get faster over
    sessions. Each row is one trial.
    """
    cues = {"valid": -0.08, "neutral": 0.0, "invalid": 0.1}
    sessions = {"first": 0.06, "second": 0.0, "third": -0.04}
    rows = []
    for p in range(1, 29):
        speed = rng.gauss(math.log(430), 0.16)
        for cue, shift in cues.items():
            for session, practice in sessions.items():
                for trial in range(1, 7):
                    ms = math.exp(speed + shift + practice + rng.gauss(0, 0.2))
                    rows.append([f"S{p:02d}", cue, session, trial, f"{ms:.0f}"])
    write("responses.csv", ["participant", "cue", "session", "trial", "ms"], rows)


def leaves(rng):
    """Leaves from two sites: dry mass and area, roughly proportional, with scatter."""
    rows = []
    for i in range(1, 61):
        site = "valley" if i % 3 else "ridge"
        mass = rng.uniform(0.15, 1.4)
        sla = 190.0 if site == "valley" else 150.0
        area = max(5.0, sla * mass + rng.gauss(0, 14))
        rows.append([f"L{i:02d}", site, f"{mass:.3f}", f"{area:.1f}"])
    write("leaves.csv", ["leaf", "site", "mass", "area"], rows)


def main():
    rng = random.Random(20261202)
    reading(rng)
    seedlings(rng)
    commute(rng)
    plots(rng)
    # Later datasets draw from their own generators, so adding one never changes another.
    clinic(random.Random(31))
    responses(random.Random(47))
    leaves(random.Random(59))


if __name__ == "__main__":
    main()
