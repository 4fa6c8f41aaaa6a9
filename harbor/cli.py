"""The ``harbor`` command: thin wrappers over the Python API (parse, call, print).

Exit codes: 0 success; 2 bad input (one line on stderr naming the file, the key and the
problem); 1 internal error (a short message asking for a report).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from importlib import resources

from harbor import __version__
from harbor.cautions import CAUTION_SHORT, caution_text
from harbor.errors import InputError

EPILOG_TAIL = "Results are preliminary; final design belongs to licensed coastal engineers under local codes."

MAP_EXAMPLE = """example:
  harbor map scenarios/demo.toml --out maps
  harbor map scenarios/demo.toml --sea "storm N" --show height --out maps

Writes, for every sea state: map-<sea>.png, sheet-<sea>.pdf, isolines-<sea>.geojson;
and grid.nc (NetCDF-CF) and points.csv. Nothing is written if any part fails.
"""

POINTS_EXAMPLE = """example:
  harbor points scenarios/demo.toml
  harbor points scenarios/demo.toml --at 302900 4986150 --at 302980 4986100 --sea "swell NW"
  harbor points scenarios/demo.toml --json

CSV columns: sea,point,x,y,kd,height (+ period_ratio when a random sea is listed);
x, y in the scenario's CRS (easting or longitude first).
"""

CHECK_EXAMPLE = """example:
  harbor check scenarios/demo.toml

Exit code 0 when the file is valid (warnings may still be printed), 2 when it is not.
"""

DIAGRAM_EXAMPLE = """examples:
  harbor diagram semi-infinite --direction 60 --out tip60.png
  harbor diagram gap --width 1.5 --direction 90 --out gap15.pdf
  harbor diagram gap --width 2 --direction 45 --random --spreading 10 --out gap2r.png

Axes are x/L and y/L; the breakwater lies on y = 0 (x >= 0 for the semi-infinite case,
|x| >= B/2 for the gap); waves arrive from y < 0 travelling at --direction degrees
counter-clockwise from +x.
"""

DEMO_EXAMPLE = """example:
  harbor demo --out harbor-out

Runs the bundled demo scenario (Port Tellivar, an invented harbour) and writes every
output of `harbor map` into the folder, then prints the berth table.
"""


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2 (argparse's own convention)
        self.exit(2, f"harbor: {message} (see 'harbor {self.prog.split()[-1]} --help')\n"
                  if " " in self.prog else f"harbor: {message} (see 'harbor --help')\n")


def _progress_printer(quiet):
    if quiet or not sys.stderr.isatty():
        return None

    def show(name, done, total):
        width = 28
        filled = int(width * done / max(total, 1))
        sys.stderr.write(f"\r  {name[:24]:<24} [{'#' * filled}{'.' * (width - filled)}] "
                         f"{done}/{total}")
        if done >= total:
            sys.stderr.write("\n")
        sys.stderr.flush()

    return show


def _load(path):
    from harbor.study.scenario import load_scenario

    return load_scenario(path)


def _select_sea(scenario, name):
    if name is None:
        return None
    names = [s.name for s in scenario.seas]
    if name not in names:
        import difflib

        near = difflib.get_close_matches(name, names, n=1)
        hint = f" (did you mean '{near[0]}'?)" if near else f" (known: {', '.join(names)})"
        raise InputError(f"no sea state named '{name}'{hint}", file=scenario.path, key="--sea")
    return name


def cmd_check(args):
    from harbor.solver.assemble import solve

    sc = _load(args.scenario)
    ds = solve(sc, grid=False)
    warnings = [w for w in ds.attrs["warnings"].split("\n") if w]
    site = sc.site
    print(f"{args.scenario}: valid — {len(sc.layout.arms)} arm(s), {len(sc.layout.lands)} land "
          f"polygon(s), {len(sc.seas)} sea state(s), {len(sc.points)} point(s)")
    print(f"  CRS {site.crs_code}; meridian convergence at the site {site.convergence_deg:+.3f} deg "
          f"(grid bearing = true bearing - convergence); depth {site.depth:g} m")
    from harbor.geometry.entrance import entrance_width

    width = entrance_width(sc.layout)
    if width is not None:
        print(f"  entrance width {width:.1f} m (narrowest water passage between the structures)")
    if sc.grid is not None:
        from harbor.solver.assemble import grid_coordinates

        gx, gy = grid_coordinates(sc.grid)
        print(f"  grid {gx.size} x {gy.size} points at {sc.grid.spacing:g} m")
    print("methods:")
    for name, method, L in zip(ds.sea.values, ds.sea_method.values, ds.sea_wavelength.values):
        print(f"  - {name}: {method} (L = {L:.1f} m)")
    _print_warnings(warnings)
    print(f"note: {CAUTION_SHORT}")
    return 0


def _print_warnings(warnings):
    if warnings:
        print("warnings:")
        for w in warnings:
            print(f"  - {w}")


def _parse_at(values):
    pts = []
    for i, (x, y) in enumerate(values or [], 1):
        try:
            fx, fy = float(x), float(y)
        except ValueError:
            raise InputError(f"--at needs two numbers, got '{x} {y}'", key="--at") from None
        if not (math.isfinite(fx) and math.isfinite(fy)):
            raise InputError(f"--at needs finite numbers, got '{x} {y}'", key="--at")
        pts.append((f"at{i}", fx, fy))
    return pts


def points_table(scenario, at=None, sea=None, method="auto"):
    """Rows of ``harbor points``: dicts with sea, point, x, y, kd, height[, period_ratio].

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    at : sequence of (name, x, y), optional
        Points in the scenario's CRS; default the scenario's named points.
    sea : str, optional
        One sea state's name.
    method : str
        Method override (see :func:`harbor.solve`).

    Returns
    -------
    rows : list of dict
    has_random : bool
    """
    from harbor.solver.assemble import solve
    from harbor.study.scenario import Scenario

    if at:
        sc = Scenario(path=scenario.path, title=scenario.title, site=scenario.site,
                      layout=scenario.layout, seas=scenario.seas, points=(), grid=scenario.grid)
        _check_points(scenario, at)
    else:
        sc = scenario
    ds = solve(sc, sea=sea, points=at, grid=False, method=method)
    site = scenario.site
    cx, cy = site.from_work(ds.point_x.values, ds.point_y.values)
    has_random = bool((ds.sea_kind.values == "random").any())
    rows = []
    for i, s in enumerate(ds.sea.values):
        for j, p in enumerate(ds.point.values):
            row = dict(sea=str(s), point=str(p), x=float(cx[j]), y=float(cy[j]),
                       kd=float(ds.point_kd.values[i, j]), height=float(ds.point_height.values[i, j]))
            if has_random:
                r = float(ds.point_period_ratio.values[i, j])
                row["period_ratio"] = None if math.isnan(r) else r
            rows.append(row)
    return rows, has_random


def _check_points(scenario, at):
    import numpy as np

    from harbor.geometry.site import lonlat_problem

    site = scenario.site
    for name, x, y in at:
        if site.is_lonlat:
            prob = lonlat_problem(x, y)
            if prob:
                raise InputError(prob, file=scenario.path, key="--at")
        wx, wy = site.to_work(np.array([x]), np.array([y]))
        if scenario.layout.in_land(wx, wy)[0]:
            raise InputError(f"point {x:g} {y:g} lies on land", file=scenario.path, key="--at")


def cmd_points(args):
    sc = _load(args.scenario)
    sea = _select_sea(sc, args.sea)
    at = _parse_at(args.at)
    rows, has_random = points_table(sc, at=at, sea=sea, method=args.method)
    if args.json:
        print(json.dumps({"crs": sc.site.crs_code, "rows": rows, "cautions": caution_text()},
                         indent=2))
        return 0
    cols = ["sea", "point", "x", "y", "kd", "height"] + (["period_ratio"] if has_random else [])
    import csv

    w = csv.writer(sys.stdout, lineterminator="\n")
    w.writerow(cols)
    for r in rows:
        out = []
        for c in cols:
            v = r.get(c)
            if isinstance(v, float):
                out.append(f"{v:.4f}" if c in ("kd", "period_ratio") else
                           (f"{v:.3f}" if c == "height" else f"{v:.8g}" if sc.site.is_lonlat else f"{v:.2f}"))
            else:
                out.append("" if v is None else v)
        w.writerow(out)
    return 0


def _run_map(scenario, out, sea=None, show="kd", method="auto", quiet=False):
    from harbor.outputs import point_table, write_all
    from harbor.solver.assemble import solve

    ds = solve(scenario, sea=sea, method=method, progress=_progress_printer(quiet))
    written = write_all(ds, scenario, out, show=show)
    print(point_table(ds))
    print(f"\nwrote {len(written)} files to {out}:")
    for p in written:
        print(f"  {p}")
    _print_warnings([w for w in ds.attrs["warnings"].split("\n") if w])
    return 0


def cmd_map(args):
    sc = _load(args.scenario)
    sea = _select_sea(sc, args.sea)
    return _run_map(sc, args.out, sea=sea, show=args.show, method=args.method, quiet=args.quiet)


def demo_path():
    """Path of the bundled demo scenario."""
    return str(resources.files("harbor").joinpath("data/demo.toml"))


def cmd_demo(args):
    sc = _load(demo_path())
    print(f"demo scenario: {sc.title} (bundled file {demo_path()})")
    return _run_map(sc, args.out, show=args.show, quiet=args.quiet)


def cmd_diagram(args):
    from harbor.outputs import plot_diagram
    from harbor.solver.diagram import diagram_field

    if args.case == "gap" and args.width is None:
        raise InputError("a gap diagram needs --width (gap width in wavelengths, B/L)", key="--width")
    if not (0 < args.direction < 180):
        raise InputError(f"--direction must be strictly between 0 and 180 degrees, got {args.direction:g}",
                         key="--direction")
    if args.width is not None and not args.width > 0:
        raise InputError(f"--width must be positive, got {args.width:g}", key="--width")
    if args.spreading <= 0:
        raise InputError(f"--spreading must be positive, got {args.spreading:g}", key="--spreading")
    ext = args.extent
    if ext is None:
        half = 4.0 if args.case == "semi-infinite" else max(4.0, (args.width or 0) / 2 + 3)
        ext = (-half, -2.0, half, 8.0)
    if not (ext[0] < ext[2] and ext[1] < ext[3]):
        raise InputError("--extent must be XMIN YMIN XMAX YMAX with XMIN < XMAX and YMIN < YMAX",
                         key="--extent")
    res = args.resolution or max((ext[2] - ext[0]) / 200.0, 0.02)
    if args.random and res < 0.05:
        res = 0.05
    ds = diagram_field(args.case, args.direction, width=args.width, extent=tuple(ext),
                       resolution=res, kind="random" if args.random else "regular",
                       spreading=args.spreading)
    out = args.out
    suffix = os.path.splitext(out)[1].lower()
    if suffix not in (".png", ".pdf"):
        raise InputError(f"--out must end in .png or .pdf, got '{out}'", key="--out")
    parent = os.path.dirname(os.path.abspath(out))
    if not os.path.isdir(parent):
        raise InputError(f"folder '{parent}' does not exist", key="--out")
    plot_diagram(ds, out)
    print(f"wrote {out} ({ds.attrs['method']})")
    print(f"note: {CAUTION_SHORT}")
    return 0


def _add_method_option(sp):
    sp.add_argument("--method", choices=["auto", "general", "superposition", "exact", "field"],
                    default="auto",
                    help="force a method (default auto: exact gap solution for narrow classic "
                         "entrances, Penney & Price superposition for wide ones, geometric optics "
                         "+ head diffraction for other layouts; field: finite-element check of "
                         "a small harbour, regular seas only)")


def add_sweep_parser(subparsers):
    """Add ``harbor sweep`` to the command's subparsers.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From ``ArgumentParser.add_subparsers``.

    Returns
    -------
    argparse.ArgumentParser
        The ``sweep`` parser (its ``func`` default is :func:`cmd_sweep`).
    """
    from harbor.study.sweep import SWEEP_EXAMPLE

    sp = subparsers.add_parser(
        "sweep", help="entrance-width sweep: move one head, heights at the points",
        epilog=SWEEP_EXAMPLE + "\n" + EPILOG_TAIL,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    sp.add_argument("scenario", help="scenario file (TOML)")
    sp.add_argument("--arm", required=True, metavar="NAME",
                    help="name of the arm whose free head moves")
    sp.add_argument("--move", required=True, nargs=3, type=float,
                    metavar=("MIN", "MAX", "STEP"),
                    help="moves in metres along the end segment (positive lengthens)")
    sp.add_argument("--sea", metavar="NAME", help="only this sea state (by name)")
    sp.add_argument("--out", default="harbor-out", metavar="DIR",
                    help="output folder (default harbor-out)")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    _add_method_option(sp)
    sp.set_defaults(func=cmd_sweep)
    return sp


def cmd_sweep(args):
    """Run ``harbor sweep``: call :func:`sweep`, write the CSV and PNG, print the table.

    Parameters
    ----------
    args : argparse.Namespace
        From the parser of :func:`add_sweep_parser`.

    Returns
    -------
    int
        0; user mistakes raise :class:`harbor.errors.InputError`.
    """
    from harbor.study.sweep import find_arm, move_range, sweep, sweep_text, verdict, write_sweep

    sc = _load(args.scenario)
    sea = _select_sea(sc, args.sea)
    moves = move_range(*args.move)
    find_arm(sc, args.arm)
    table = sweep(sc, args.arm, moves, sea=sea, method=args.method,
                  progress=_progress_printer(args.quiet))
    for m, why in table.attrs["skipped"]:
        print(f"skipped move {m:+g} m: {why}")
    if table.empty:
        raise InputError("every move was skipped; nothing to write", file=sc.path,
                         key="--move")
    written = write_sweep(table, args.out)
    widths = table.groupby("move")["entrance_width"].first()
    print(f"{len(widths)} position(s) of the head of '{args.arm}', entrance width "
          f"{widths.min():.1f} to {widths.max():.1f} m")
    print(sweep_text(table))
    print(verdict(table))
    print(f"wrote {', '.join(str(p) for p in written)}")
    _print_warnings(table.attrs["warnings"])
    print(f"note: {CAUTION_SHORT}")
    return 0


def add_climate_parser(subparsers):
    """Add ``harbor climate`` to the command's subparsers.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From ``ArgumentParser.add_subparsers``.

    Returns
    -------
    argparse.ArgumentParser
        The ``climate`` parser (its ``func`` default is :func:`cmd_climate`).
    """
    from harbor.study.climate import CLIMATE_EXAMPLE

    sp = subparsers.add_parser(
        "climate", help="berth downtime (%% of time above the limit) from a wave climate table",
        epilog=CLIMATE_EXAMPLE + "\n" + EPILOG_TAIL,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    sp.add_argument("scenario", help="scenario file (TOML); its points' limits are used")
    sp.add_argument("--table", required=True, metavar="FILE",
                    help="climate table (CSV: height,period,from,percent[,spreading])")
    sp.add_argument("--arm", metavar="NAME",
                    help="first move the free head of this arm (with --move)")
    sp.add_argument("--move", type=float, metavar="METRES",
                    help="distance to move that head along its end segment (positive "
                         "lengthens)")
    sp.add_argument("--out", default="harbor-out", metavar="DIR",
                    help="output folder (default harbor-out)")
    sp.add_argument("--workers", type=int, metavar="N",
                    help="threads to use (default: one per core)")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    _add_method_option(sp)
    sp.set_defaults(func=cmd_climate)
    return sp


def cmd_climate(args):
    """Run ``harbor climate``: call :func:`climate_downtime`, write, print the table.

    Parameters
    ----------
    args : argparse.Namespace
        From the parser of :func:`add_climate_parser`.

    Returns
    -------
    int
        0; user mistakes raise :class:`harbor.errors.InputError`.
    """
    from harbor.geometry.entrance import entrance_width
    from harbor.study.climate import (climate_downtime, downtime_text, percent_warning,
                                      read_climate, write_climate)
    from harbor.study.sweep import MoveRejected, move_head

    sc = _load(args.scenario)
    if (args.arm is None) != (args.move is None):
        raise InputError("--arm and --move go together", key="--arm" if args.arm is None
                         else "--move")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers must be at least 1, got {args.workers}", key="--workers")
    table = read_climate(args.table)
    pw = percent_warning(table)
    if pw:
        print(f"warning: {pw}")
    title = None
    if args.arm is not None:
        try:
            sc, width = move_head(sc, args.arm, args.move)
        except MoveRejected as e:
            raise InputError(f"cannot move the head of '{args.arm}' by {args.move:g} m: {e}",
                             file=sc.path, key="--move") from None
        print(f"head of '{args.arm}' moved {args.move:+g} m: entrance width {width:.1f} m")
        title = f"Berth downtime, head of '{args.arm}' moved {args.move:+g} m " \
                f"(entrance {width:.1f} m)"
    else:
        width = entrance_width(sc.layout)
        if width is not None:
            print(f"entrance width (narrowest passage): {width:.1f} m")
            title = f"Berth downtime by wave direction (entrance {width:.1f} m)"
    res = climate_downtime(sc, table, method=args.method, workers=args.workers,
                           progress=_progress_printer(args.quiet))
    written = write_climate(res, args.out, title=title)
    print(f"{res.downtime.attrs['table_rows']} climate rows, "
          f"{res.downtime.attrs['cases']} distinct (period, direction, spreading) cases")
    print(downtime_text(res))
    print(f"wrote {', '.join(str(p) for p in written)}")
    _print_warnings([w for w in res.warnings if w != pw])
    print(f"note: {CAUTION_SHORT}")
    return 0


def build_parser():
    p = _Parser(prog="harbor",
                description="Wave diffraction screening for harbour layouts: sheltering maps, berth "
                            "wave heights, design diagrams.",
                epilog="Run 'harbor COMMAND --help' for a worked example. " + EPILOG_TAIL,
                formatter_class=argparse.RawDescriptionHelpFormatter)
    p.add_argument("--version", action="version", version=f"harbor {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True
    fmt = argparse.RawDescriptionHelpFormatter

    method_opt = _add_method_option

    sp = sub.add_parser("map", help="sheltering maps, PDF sheets, GeoJSON, NetCDF and CSV for every sea state",
                        epilog=MAP_EXAMPLE + "\n" + EPILOG_TAIL, formatter_class=fmt)
    sp.add_argument("scenario", help="scenario file (TOML)")
    sp.add_argument("--out", default="harbor-out", help="output folder (default harbor-out)")
    sp.add_argument("--sea", help="only this sea state (by name)")
    sp.add_argument("--show", choices=["kd", "height"], default="kd",
                    help="fill the maps with K' (default) or wave height")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    method_opt(sp)
    sp.set_defaults(func=cmd_map)

    sp = sub.add_parser("points", help="K' and wave heights at points (CSV or JSON on stdout)",
                        epilog=POINTS_EXAMPLE + "\n" + EPILOG_TAIL, formatter_class=fmt)
    sp.add_argument("scenario", help="scenario file (TOML)")
    sp.add_argument("--at", nargs=2, action="append", metavar=("X", "Y"),
                    help="a point in the scenario's CRS (repeatable); default the scenario's points")
    sp.add_argument("--sea", help="only this sea state (by name)")
    sp.add_argument("--json", action="store_true", help="JSON instead of CSV")
    method_opt(sp)
    sp.set_defaults(func=cmd_points)

    sp = sub.add_parser("check", help="validate a scenario and print the validity warnings",
                        epilog=CHECK_EXAMPLE + "\n" + EPILOG_TAIL, formatter_class=fmt)
    sp.add_argument("scenario", help="scenario file (TOML)")
    sp.set_defaults(func=cmd_check)

    sp = sub.add_parser("diagram", help="non-dimensional diffraction diagram (x/L, y/L)",
                        epilog=DIAGRAM_EXAMPLE + "\n" + EPILOG_TAIL, formatter_class=fmt)
    sp.add_argument("case", choices=["semi-infinite", "gap"], help="breakwater case")
    sp.add_argument("--direction", type=float, default=90.0,
                    help="direction of wave travel, degrees CCW from +x, 0-180 exclusive (default 90)")
    sp.add_argument("--width", type=float, help="gap width in wavelengths B/L (gap only)")
    sp.add_argument("--random", action="store_true",
                    help="directional random sea (Goda) instead of a regular sea")
    sp.add_argument("--spreading", type=float, default=10.0, help="s_max for --random (default 10)")
    sp.add_argument("--extent", type=float, nargs=4, metavar=("XMIN", "YMIN", "XMAX", "YMAX"),
                    help="plotted area in wavelengths (default about -4 -2 4 8)")
    sp.add_argument("--resolution", type=float, help="grid step in wavelengths")
    sp.add_argument("--out", default="diagram.png", help="output file, .png or .pdf (default diagram.png)")
    sp.set_defaults(func=cmd_diagram)

    sp = sub.add_parser("demo", help="run the bundled demo harbour and write all outputs",
                        epilog=DEMO_EXAMPLE + "\n" + EPILOG_TAIL, formatter_class=fmt)
    sp.add_argument("--out", default="harbor-out", help="output folder (default harbor-out)")
    sp.add_argument("--show", choices=["kd", "height"], default="kd", help="fill with K' or height")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    sp.set_defaults(func=cmd_demo)

    add_sweep_parser(sub)
    add_climate_parser(sub)
    return p


def main(argv=None):
    """Entry point of the ``harbor`` command; returns the exit code."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.func(args) or 0)
    except InputError as e:
        print(f"harbor: {e.line()}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("harbor: interrupted; no output written", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as e:  # pragma: no cover - internal errors
        print(f"harbor: internal error ({type(e).__name__}: {e}). This is a bug in harbor "
              f"{__version__}; please report it with the command and the scenario file.",
              file=sys.stderr)
        if os.environ.get("HARBOR_DEBUG"):
            raise
        return 1


if __name__ == "__main__":
    sys.exit(main())
