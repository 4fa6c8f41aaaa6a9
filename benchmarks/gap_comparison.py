"""Compare the Penney & Price superposition with the exact aperture solution for a gap.

Prints, for a range of B/L and approach angles, the largest and the median difference
in K' over the lee region one to six wavelengths behind the gap (|x| <= B/2 + 3L).
The table chose ``harbor.solver.kernels.gap.AUTO_EXACT_BELOW`` (docs/methods.md).

    python benchmarks/gap_comparison.py
"""

import numpy as np

from harbor.solver.kernels.gap import gap_exact, gap_superposition

L = 1.0
RATIOS = [0.25, 0.5, 1.0, 1.5, 2.0, 3.0, 4.0, 6.0, 8.0]
ANGLES = [90, 75, 60, 45, 30, 15]


def main():
    print("B/L   " + "".join(f"{a:>14d}" for a in ANGLES))
    print("      " + "".join(f"{'max / median':>14s}" for _ in ANGLES))
    for r in RATIOS:
        B = r * L
        xs = np.linspace(-(B / 2 + 3 * L), B / 2 + 3 * L, 61)
        ys = np.linspace(L, 6 * L, 21)
        X, Y = np.meshgrid(xs, ys)
        row = []
        for a in ANGLES:
            d = np.abs(np.abs(gap_exact(X, Y, L, a, B)) - np.abs(gap_superposition(X, Y, L, a, B)))
            row.append(f"{d.max():7.3f}/{np.median(d):.3f}")
        print(f"{r:<6g}" + "".join(f"{c:>14s}" for c in row))


if __name__ == "__main__":
    main()
