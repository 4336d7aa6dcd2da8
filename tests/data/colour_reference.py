"""Writes colour-conversions.csv and ciede2000-pairs.csv, the reference values of tests/colour.rs.

Every value is computed here with numpy from the published definitions (see colour-reference.md):
sRGB transfer function and primaries (IEC 61966-2-1), CIELAB (CIE 15:2004), OKLab (Ottosson 2020),
the Machado, Oliveira & Fernandes (2009) matrices at severity 1.0. When the colour-science package
is installed (0.4.7 was used), the same quantities are recomputed by its independent
implementation and must agree to 1e-9, and the random CIEDE2000 pairs take their ΔE00 from it.

    python3 -m pip install numpy colour-science==0.4.7
    python3 tests/data/colour_reference.py
"""

import csv
import os

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))

# IEC 61966-2-1: primaries and D65 white as chromaticities.
PRIMARIES = np.array([[0.64, 0.33], [0.30, 0.60], [0.15, 0.06]])
WHITE_XY = np.array([0.3127, 0.3290])


def xyz_of(xy):
    x, y = xy
    return np.array([x / y, 1.0, (1.0 - x - y) / y])


def rgb_to_xyz_matrix():
    p = np.column_stack([xyz_of(c) for c in PRIMARIES])
    return p * np.linalg.solve(p, xyz_of(WHITE_XY))


M_XYZ = rgb_to_xyz_matrix()
WHITE = xyz_of(WHITE_XY)

# Ottosson (2020), "A perceptual color space for image processing".
M_LMS = np.array([[0.4122214708, 0.5363325363, 0.0514459929],
                  [0.2119034982, 0.6806995451, 0.1073969566],
                  [0.0883024619, 0.2817188376, 0.6299787005]])
M_OKLAB = np.array([[0.2104542553, 0.7936177850, -0.0040720468],
                    [1.9779984951, -2.4285922050, 0.4505937099],
                    [0.0259040371, 0.7827717662, -0.8086757660]])

# Machado, Oliveira & Fernandes (2009), severity 1.0.
MACHADO = {
    "protanopia": np.array([[0.152286, 1.052583, -0.204868],
                            [0.114503, 0.786281, 0.099216],
                            [-0.003882, -0.048116, 1.051998]]),
    "deuteranopia": np.array([[0.367322, 0.860646, -0.227968],
                              [0.280085, 0.672501, 0.047413],
                              [-0.011820, 0.042940, 0.968881]]),
    "tritanopia": np.array([[1.255528, -0.076749, -0.178779],
                            [-0.078411, 0.930809, 0.147602],
                            [0.004733, 0.691367, 0.303900]]),
}


def decode(c):
    return np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)


def lab(xyz):
    d = 6 / 29
    t = xyz / WHITE
    f = np.where(t > d ** 3, np.cbrt(t), t / (3 * d * d) + 4 / 29)
    return np.array([116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])])


def oklab(lin):
    return M_OKLAB @ np.cbrt(M_LMS @ lin)


def colours():
    fixed = ["#000000", "#ffffff", "#808080", "#010101", "#0a0a0a", "#ff0000", "#00ff00",
             "#0000ff", "#ffff00", "#00ffff", "#ff00ff", "#0072b2", "#e69f00", "#009e73",
             "#d55e00", "#cc79a7", "#56b4e9", "#f0e442"]
    rng = np.random.default_rng(20260607)
    randoms = ["#%02x%02x%02x" % tuple(rng.integers(0, 256, 3)) for _ in range(40)]
    return fixed + randoms


def rows():
    for hex_ in colours():
        srgb = np.array([int(hex_[i:i + 2], 16) / 255 for i in (1, 3, 5)])
        lin = decode(srgb)
        xyz = M_XYZ @ lin
        ok = oklab(lin)
        row = {"hex": hex_}
        row.update(zip(["lin_r", "lin_g", "lin_b"], lin))
        row.update(zip(["X", "Y", "Z"], xyz))
        row.update(zip(["L", "a", "b"], lab(xyz)))
        row.update(zip(["ok_L", "ok_a", "ok_b"], ok))
        for name, m in MACHADO.items():
            row.update(zip([f"{name[:4]}_{c}" for c in "rgb"], np.clip(m @ lin, 0, 1)))
        row["grey_Y"] = xyz[1]
        yield row


def cross_check(table):
    try:
        import colour
    except ImportError:
        print("colour-science not installed: no cross-check")
        return None
    import warnings
    warnings.filterwarnings("ignore")
    npm = colour.normalised_primary_matrix(PRIMARIES.ravel(), WHITE_XY)
    for row in table:
        srgb = colour.notation.HEX_to_RGB(row["hex"])
        lin = colour.models.eotf_sRGB(srgb)
        xyz = npm @ lin
        checks = {
            "lin": (lin, [row["lin_r"], row["lin_g"], row["lin_b"]]),
            "lab": (colour.XYZ_to_Lab(xyz, WHITE_XY), [row["L"], row["a"], row["b"]]),
            "oklab": (colour.XYZ_to_Oklab(xyz), None),
        }
        for name, (theirs, ours) in checks.items():
            if ours is not None:
                assert np.allclose(theirs, ours, rtol=0, atol=1e-9), (row["hex"], name)
        # colour-science's OKLab goes through XYZ with Ottosson's XYZ matrix, which matches
        # his sRGB matrix to about 3e-4 only: compare at that level.
        assert np.allclose(checks["oklab"][0], [row["ok_L"], row["ok_a"], row["ok_b"]],
                           atol=5e-4), row["hex"]
        for name in MACHADO:
            key = {"protanopia": "Protanomaly", "deuteranopia": "Deuteranomaly",
                   "tritanopia": "Tritanomaly"}[name]
            m = colour.blindness.matrix_cvd_Machado2009(key, 1.0)
            ours = [row[f"{name[:4]}_{c}"] for c in "rgb"]
            assert np.allclose(np.clip(m @ lin, 0, 1), ours, atol=1e-12), (row["hex"], name)
    return colour


def ciede2000_pairs(colour):
    rng = np.random.default_rng(20260608)
    out = []
    for i in range(200):
        a = np.array([rng.uniform(0, 100), rng.uniform(-110, 110), rng.uniform(-110, 110)])
        # Half the pairs close together, where the hue terms matter most.
        scale = 3.0 if i % 2 == 0 else 40.0
        b = a + rng.normal(0, scale, 3)
        b[0] = np.clip(b[0], 0, 100)
        de = float(colour.delta_E(a, b, method="CIE 2000"))
        out.append(list(a) + list(b) + [de])
    return out


def main():
    table = list(rows())
    colour = cross_check(table)
    with open(os.path.join(HERE, "colour-conversions.csv"), "w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=list(table[0].keys()), lineterminator="\n")
        w.writeheader()
        for row in table:
            w.writerow({k: (v if k == "hex" else repr(float(v))) for k, v in row.items()})
    if colour is not None:
        with open(os.path.join(HERE, "ciede2000-pairs.csv"), "w", newline="") as f:
            w = csv.writer(f, lineterminator="\n")
            w.writerow(["L1", "a1", "b1", "L2", "a2", "b2", "dE00"])
            for r in ciede2000_pairs(colour):
                w.writerow([repr(float(v)) for v in r])


if __name__ == "__main__":
    main()
