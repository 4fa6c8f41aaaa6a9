"""Write the invented survey of Port Tellivar (the demo harbour): demo-soundings.csv.

    python scenarios/tools/make_demo_survey.py

Port Tellivar is fictional and so is its survey: a sloping shore outside the harbour
(1:60 from 2 m at the shore line to 12 m offshore), a basin dredged to at least 5 m below
chart datum with gentle side slopes, and an entrance channel dredged to 8 m, 40 m wide,
running from inside the entrance 250 m out to sea. Soundings on a 20 m grid, depths in m below chart datum (positive down),
in the scenario's CRS (EPSG:32630). The same file is bundled with the package.
"""

from pathlib import Path

import numpy as np
import shapely

HERE = Path(__file__).resolve().parents[1]
SHORE_A = np.array([302184.3, 4985619.6])
SHORE_B = np.array([303815.7, 4986380.4])
BASIN = shapely.Polygon([(302804.8, 4985898.0), (302673.8, 4986178.9), (302832.4, 4986252.9),
                         (302914.0, 4986290.9), (303072.6, 4986364.9), (303203.6, 4986083.9)])
ENTRANCE = np.array([0.5 * (302832.4 + 302914.0), 0.5 * (4986252.9 + 4986290.9)])


def depth(x, y):
    t = (SHORE_B - SHORE_A) / np.hypot(*(SHORE_B - SHORE_A))
    n = np.array([-t[1], t[0]])                       # towards the sea
    off = (x - SHORE_A[0]) * n[0] + (y - SHORE_A[1]) * n[1]
    d = np.clip(2.0 + off / 60.0, 2.0, 12.0)          # the natural sloping shore
    # the dredged basin: at least 5 m inside, blending over 24 m at its edge
    dist = shapely.distance(BASIN.boundary, shapely.points(x, y))
    inside = shapely.contains_xy(BASIN, x, y)
    w = np.where(inside, np.clip(0.5 + dist / 24.0, 0, 1), np.clip(0.5 - dist / 24.0, 0, 1))
    d = np.maximum(d, w * 5.0 + (1 - w) * d)
    # the entrance channel: 8 m, 40 m wide, from inside the entrance 250 m out to sea
    a = (x - ENTRANCE[0]) * n[0] + (y - ENTRANCE[1]) * n[1]
    c = np.abs((x - ENTRANCE[0]) * t[0] + (y - ENTRANCE[1]) * t[1])
    along = np.clip(1.0 - np.maximum(np.maximum(-40.0 - a, a - 250.0), 0) / 30.0, 0, 1)
    across = np.clip(1.0 - np.maximum(c - 20.0, 0) / 24.0, 0, 1)
    wc = along * across
    return np.maximum(d, wc * 8.0 + (1 - wc) * d)


def main():
    xs = np.arange(302100.0, 303640.0 + 1, 20.0)
    ys = np.arange(4985560.0, 4987060.0 + 1, 20.0)
    X, Y = np.meshgrid(xs, ys)
    D = depth(X.ravel(), Y.ravel())
    out = HERE / "demo-soundings.csv"
    with open(out, "w") as f:
        f.write("# Port Tellivar (INVENTED demonstration harbour): invented soundings, "
                "EPSG:32630, depth in m below chart datum\n")
        f.write("x,y,depth\n")
        for x, y, d in zip(X.ravel(), Y.ravel(), D):
            f.write(f"{x:.0f},{y:.0f},{d:.1f}\n")
    print(f"wrote {out} ({D.size} soundings, {D.min():.1f}-{D.max():.1f} m)")


if __name__ == "__main__":
    main()
