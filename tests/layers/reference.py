#!/usr/bin/env python3
"""Reference values from scipy for the layer checks of tests/layers.rs.

Modes (a JSON request on stdin, JSON on stdout; numbers travel as JSON doubles, which both
sides read and write exactly):
  reference.py ecdf   scipy.stats.ecdf(sample).cdf: its distinct values and probabilities
"""

import json
import sys

import numpy as np
from scipy import stats


def mode_ecdf(request):
    out = []
    for sample in request:
        cdf = stats.ecdf(np.array(sample, dtype=float)).cdf
        out.append({"values": cdf.quantiles.tolist(), "probabilities": cdf.probabilities.tolist()})
    return out


MODES = {"ecdf": mode_ecdf}

if __name__ == "__main__":
    print(json.dumps(MODES[sys.argv[1]](json.load(sys.stdin))))
