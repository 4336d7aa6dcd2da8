#!/usr/bin/env python3
"""Reference values from numpy and scipy for the end-to-end checks of tests/features.rs.

Modes (a JSON request on stdin, JSON on stdout). Input doubles travel as IEEE-754 bit patterns,
as in tests/differential/reference.py, so both sides see the same values; outputs are plain
JSON numbers, compared with a tolerance.
  end_to_end.py kde         bandwidths by rule (numpy) and scipy.stats.gaussian_kde densities
  end_to_end.py quartiles   numpy.quantile(method="linear") quartiles (Hyndman & Fan def. 7)
  end_to_end.py histogram   numpy.histogram(density=True) for given edges
  end_to_end.py t           scipy.stats.t.ppf for (p, df) pairs
  end_to_end.py trials      repeated-trial data drawn by numpy (fixed seed), as CSV text
  end_to_end.py collapse    one value per subject and cell (numpy mean or median of the
                            trials), then per-cell means and Cousineau-Morey intervals
  end_to_end.py bootstrap   percentile bootstrap of a mean or median with Figura's generator

Restated definitions (not library calls) are marked where they are used: the bandwidth rules
(Silverman 1986 eq. 3.31; Scott's 1.06 rule), Cousineau (2005) with Morey's (2008) correction,
and the percentile bootstrap (Efron & Tibshirani 1993) with the generator of
src/stats/random.rs; the last two come from tests/differential/reference.py.
"""

import csv
import io
import json
import math
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "differential"))

from reference import (  # noqa: E402  (path set just above)
    Xoshiro256StarStar,
    cousineau_morey,
    from_bits,
    num,
    np,
    stats,
)


def values_of(item, key="values"):
    return np.array([from_bits(b) for b in item[key]])


def bandwidth(v, rule):
    """Silverman (1986, eq. 3.31) and Scott's rule restated in numpy; a number is used as given."""
    if not isinstance(rule, str):
        return float(rule)
    n = len(v)
    sd = float(np.std(v, ddof=1))
    if rule == "scott":
        return 1.06 * sd * n ** (-0.2)
    q1, q3 = np.quantile(v, [0.25, 0.75], method="linear")
    iqr = float(q3 - q1)
    spread = min(sd, iqr / 1.34) if iqr > 0 else sd
    return 0.9 * spread * n ** (-0.2)


def mode_kde(request):
    out = []
    for item in request:
        v = values_of(item)
        h = bandwidth(v, item["rule"])
        grid = values_of(item, "grid")
        # scipy scales its factor by the sample sd (ddof=1): factor = h / sd gives bandwidth h.
        kde = stats.gaussian_kde(v, bw_method=h / np.std(v, ddof=1))
        out.append({"bandwidth": num(h), "density": [num(d) for d in kde.evaluate(grid)]})
    return out


def mode_quartiles(request):
    return [
        [num(q) for q in np.quantile(values_of(item), [0.25, 0.5, 0.75], method="linear")]
        for item in request
    ]


def mode_histogram(request):
    out = []
    for item in request:
        density, _ = np.histogram(values_of(item), bins=values_of(item, "edges"), density=True)
        out.append([num(d) for d in density])
    return out


def mode_t(request):
    return [num(stats.t.ppf(p, df)) for p, df in request]


def mode_trials(request):
    """Subjects x conditions x sessions x trials, drawn by numpy with the given seed."""
    rng = np.random.default_rng(request["seed"])
    text = io.StringIO()
    w = csv.writer(text, lineterminator="\n")
    w.writerow(["subject", "condition", "session", "trial", "score"])
    conditions = request["conditions"]
    sessions = request["sessions"]
    for s in range(1, request["subjects"] + 1):
        base = rng.normal(50.0, 8.0)
        for c, cond in enumerate(conditions):
            for k, session in enumerate(sessions):
                for t in range(1, request["trials"] + 1):
                    score = base + 3.0 * c - 1.5 * k + rng.normal(0.0, 4.0)
                    w.writerow([f"S{s:02d}", cond, session, t, f"{score:.3f}"])
    return {"csv": text.getvalue()}


def mode_collapse(request):
    """Per subject and condition (over the kept sessions): the mean or median of its trials;
    then per condition the mean of those, and the Cousineau-Morey interval over conditions."""
    rows = list(csv.DictReader(io.StringIO(request["csv"])))
    keep = set(request["sessions"])
    conditions = request["conditions"]
    subjects = sorted({r["subject"] for r in rows})
    reduce = np.mean if request["collapse"] == "mean" else np.median
    matrix = np.full((len(subjects), len(conditions)), np.nan)
    for i, s in enumerate(subjects):
        for j, c in enumerate(conditions):
            trials = [float(r["score"]) for r in rows
                      if r["subject"] == s and r["condition"] == c and r["session"] in keep]
            if trials:
                matrix[i, j] = reduce(trials)
    within = cousineau_morey(matrix, [request["level"]])
    return {
        "n": [int(np.sum(~np.isnan(matrix[:, j]))) for j in range(len(conditions))],
        "means": within["means"],
        "half_widths": within["ci"][0]["half_widths"],
        "subject_values": [[num(x) for x in matrix[:, j]] for j in range(len(conditions))],
    }


def mode_bootstrap(request):
    """Percentile bootstrap restated: Figura's generator draws the indices, numpy computes each
    resample's statistic and the definition-7 percentiles."""
    out = []
    for item in request:
        v = values_of(item)
        n = len(v)
        rng = Xoshiro256StarStar(item["seed"])
        reps = []
        for _ in range(item["resamples"]):
            resample = v[[rng.below(n) for _ in range(n)]]
            reps.append(np.mean(resample) if item["statistic"] == "mean" else np.median(resample))
        tail = (1.0 - item["level"]) / 2.0
        out.append([num(np.quantile(reps, tail, method="linear")),
                    num(np.quantile(reps, 1.0 - tail, method="linear"))])
    return out


MODES = {
    "kde": mode_kde,
    "quartiles": mode_quartiles,
    "histogram": mode_histogram,
    "t": mode_t,
    "trials": mode_trials,
    "collapse": mode_collapse,
    "bootstrap": mode_bootstrap,
}


def main():
    if len(sys.argv) != 2 or sys.argv[1] not in MODES:
        sys.stderr.write("usage: end_to_end.py %s < request.json\n" % " | ".join(MODES))
        sys.exit(2)
    json.dump(MODES[sys.argv[1]](json.load(sys.stdin)), sys.stdout)


if __name__ == "__main__":
    main()
