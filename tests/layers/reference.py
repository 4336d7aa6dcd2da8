#!/usr/bin/env python3
"""Reference values from scipy and statsmodels for the layer checks of tests/layers.rs.

Modes (a JSON request on stdin, JSON on stdout; numbers travel as JSON doubles, which both
sides read and write exactly):
  reference.py ecdf       scipy.stats.ecdf(sample).cdf: its distinct values and probabilities
  reference.py ols        statsmodels OLS: params, bse, conf_int, rsquared, sqrt(scale), and
                          get_prediction(at).summary_frame (mean and observation intervals)
  reference.py wilson     statsmodels.stats.proportion.proportion_confint(method="wilson")
  reference.py geometric  scipy.stats.gmean, and the t interval of numpy.log restated with
                          scipy.stats.t.ppf (sd, se and ci factors exponentiated)
  reference.py median_ci  order-statistic ranks from scipy.stats.binom.cdf (the largest l with
                          1 - 2 P(B <= l - 1) >= L) and McGill-Tukey-Larsen notches from
                          numpy.percentile(method="linear")
  reference.py bca        scipy.stats.bootstrap(method="BCa") of the mean, 50 000 resamples,
                          with its bootstrap standard error
  reference.py reflected  the density reflected at zero, sum of scipy.stats.norm.pdf((x - v)/h)
                          + norm.pdf((x + v)/h) over n h for x >= 0 (Silverman 1986 §2.10
                          restated)
  reference.py lowess     statsmodels.nonparametric.lowess(y, x, frac, it=3, delta=0): the smooth
                          at its sorted x, read at the points asked for with numpy.interp (exact
                          at the data's x); and the neighbours per local line, int(frac n + 1e-10)
  reference.py t_means    numpy mean, sd (ddof 1) and se, and scipy.stats.t.interval of each sample
  reference.py paired     scipy.stats.ttest_rel(level, reference): the mean difference, df and
                          confidence_interval(L)
  reference.py welch      scipy.stats.ttest_ind(level, reference, equal_var=False): the
                          difference of means, df and confidence_interval(L)
  reference.py shares     numpy.unique(values, return_counts=True): each level's count and
                          percent of the values
  reference.py swarm      the swarm's sweep restated (module doc of src/stats/dotplot.rs): the
                          offset of each dot at heights y (mm) with radius r
"""

import json
import math
import sys

import numpy as np
from scipy import stats


def mode_ecdf(request):
    out = []
    for sample in request:
        cdf = stats.ecdf(np.array(sample, dtype=float)).cdf
        out.append({"values": cdf.quantiles.tolist(), "probabilities": cdf.probabilities.tolist()})
    return out


def mode_ols(request):
    import statsmodels.api as sm

    x = np.array(request["x"], dtype=float)
    y = np.array(request["y"], dtype=float)
    level = request["level"]
    fit = sm.OLS(y, sm.add_constant(x)).fit()
    conf = fit.conf_int(alpha=1.0 - level)
    at = np.array(request["at"], dtype=float)
    frame = fit.get_prediction(sm.add_constant(at, has_constant="add")).summary_frame(
        alpha=1.0 - level
    )
    return {
        "intercept": fit.params[0],
        "slope": fit.params[1],
        "intercept_se": fit.bse[0],
        "slope_se": fit.bse[1],
        "intercept_ci": conf[0].tolist(),
        "slope_ci": conf[1].tolist(),
        "r_squared": fit.rsquared,
        "residual_sd": float(np.sqrt(fit.scale)),
        "fitted": frame["mean"].tolist(),
        "mean_low": frame["mean_ci_lower"].tolist(),
        "mean_high": frame["mean_ci_upper"].tolist(),
        "obs_low": frame["obs_ci_lower"].tolist(),
        "obs_high": frame["obs_ci_upper"].tolist(),
    }


def mode_wilson(request):
    from statsmodels.stats.proportion import proportion_confint

    out = []
    for count, n, level in request:
        low, high = proportion_confint(count, n, alpha=1.0 - level, method="wilson")
        out.append([float(low), float(high)])
    return out


def mode_geometric(request):
    level = request["level"]
    out = []
    for sample in request["samples"]:
        v = np.array(sample, dtype=float)
        logs = np.log(v)
        n = len(v)
        sd = float(np.std(logs, ddof=1))
        se = sd / np.sqrt(n)
        t = stats.t.ppf(1.0 - (1.0 - level) / 2.0, n - 1)
        out.append(
            {
                "gmean": float(stats.gmean(v)),
                "sd_factor": float(np.exp(sd)),
                "se_factor": float(np.exp(se)),
                "ci": [float(np.exp(logs.mean() - t * se)), float(np.exp(logs.mean() + t * se))],
            }
        )
    return out


def mode_median_ci(request):
    level = request["level"]
    out = []
    for sample in request["samples"]:
        v = np.sort(np.array(sample, dtype=float))
        n = len(v)
        ranks = [
            l
            for l in range(1, (n + 1) // 2 + 1)
            if 1.0 - 2.0 * stats.binom.cdf(l - 1, n, 0.5) >= level
        ]
        q1, median, q3 = np.percentile(v, [25, 50, 75], method="linear")
        half = 1.58 * (q3 - q1) / np.sqrt(n)
        entry = {"median": float(median), "notch": [float(median - half), float(median + half)]}
        if ranks:
            l = max(ranks)
            entry["ci"] = [float(v[l - 1]), float(v[n - l])]
            entry["coverage"] = float(1.0 - 2.0 * stats.binom.cdf(l - 1, n, 0.5))
        out.append(entry)
    return out


def mode_bca(request):
    level = request["level"]
    out = []
    for sample in request["samples"]:
        v = np.array(sample, dtype=float)
        res = stats.bootstrap(
            (v,),
            np.mean,
            confidence_level=level,
            n_resamples=50_000,
            method="BCa",
            random_state=np.random.default_rng(19_870_101),
        )
        ci = res.confidence_interval
        out.append(
            {"low": float(ci.low), "high": float(ci.high), "standard_error": float(res.standard_error)}
        )
    return out


def mode_reflected(request):
    v = np.array(request["values"], dtype=float)
    h = request["bandwidth"]
    x = np.array(request["grid"], dtype=float)
    n = len(v)
    d = (stats.norm.pdf((x[:, None] - v) / h) + stats.norm.pdf((x[:, None] + v) / h)).sum(axis=1)
    return np.where(x >= 0, d / (n * h), 0.0).tolist()


def mode_lowess(request):
    from statsmodels.nonparametric.smoothers_lowess import lowess

    out = []
    for group in request:
        x = np.array(group["x"], dtype=float)
        y = np.array(group["y"], dtype=float)
        fit = lowess(y, x, frac=group["frac"], it=3, delta=0.0, return_sorted=True)
        at = np.array(group["at"], dtype=float)
        out.append(
            {
                "smooth": np.interp(at, fit[:, 0], fit[:, 1]).tolist(),
                "neighbours": max(2, min(len(x), int(group["frac"] * len(x) + 1e-10))),
            }
        )
    return out


def mode_paired(request):
    out = []
    for level, reference, confidence in request:
        res = stats.ttest_rel(np.array(level, dtype=float), np.array(reference, dtype=float))
        ci = res.confidence_interval(confidence_level=confidence)
        out.append(
            {
                "difference": float(np.mean(np.array(level) - np.array(reference))),
                "df": float(res.df),
                "ci": [float(ci.low), float(ci.high)],
                "t": float(res.statistic),
            }
        )
    return out


def mode_t_means(request):
    level = request["level"]
    out = []
    for sample in request["samples"]:
        v = np.array(sample, dtype=float)
        n = len(v)
        sd = float(np.std(v, ddof=1))
        se = sd / np.sqrt(n)
        low, high = stats.t.interval(level, n - 1, loc=float(v.mean()), scale=se)
        out.append({"mean": float(v.mean()), "sd": sd, "se": se, "ci": [float(low), float(high)]})
    return out


def mode_welch(request):
    out = []
    for level, reference, confidence in request:
        a = np.array(level, dtype=float)
        b = np.array(reference, dtype=float)
        res = stats.ttest_ind(a, b, equal_var=False)
        ci = res.confidence_interval(confidence_level=confidence)
        out.append(
            {
                "difference": float(a.mean() - b.mean()),
                "df": float(res.df),
                "ci": [float(ci.low), float(ci.high)],
            }
        )
    return out


def mode_shares(request):
    out = []
    for values, levels in request:
        names, counts = np.unique(np.array(values, dtype=str), return_counts=True)
        found = dict(zip(names.tolist(), counts.tolist()))
        n = len(values)
        out.append(
            {
                "n": n,
                "count": [found.get(l, 0) for l in levels],
                "percent": [100.0 * found.get(l, 0) / n for l in levels],
            }
        )
    return out


def mode_swarm(request):
    """Each dot, lowest first (ties in order), at the offset nearest zero where it keeps 2r from
    every dot placed before it; of two equally near, the positive one."""
    heights = request["heights"]
    r = request["radius"]
    order = sorted(range(len(heights)), key=lambda i: heights[i])
    placed = []
    offsets = [0.0] * len(heights)
    for i in order:
        y = heights[i]
        near = [(o, math.sqrt(4 * r * r - (y - q) ** 2)) for q, o in placed if abs(y - q) < 2 * r]
        candidates = [0.0] + [o + g for o, g in near] + [o - g for o, g in near]
        candidates.sort(key=lambda c: (abs(c), -c))
        for c in candidates:
            if all(abs(c - o) >= g - 1e-9 * r for o, g in near):
                offsets[i] = c
                break
        placed.append((y, offsets[i]))
    return offsets


MODES = {
    "ecdf": mode_ecdf,
    "ols": mode_ols,
    "wilson": mode_wilson,
    "geometric": mode_geometric,
    "median_ci": mode_median_ci,
    "bca": mode_bca,
    "reflected": mode_reflected,
    "lowess": mode_lowess,
    "t_means": mode_t_means,
    "paired": mode_paired,
    "welch": mode_welch,
    "shares": mode_shares,
    "swarm": mode_swarm,
}

if __name__ == "__main__":
    print(json.dumps(MODES[sys.argv[1]](json.load(sys.stdin))))
