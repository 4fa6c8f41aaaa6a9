"""The ``harbor`` command: thin wrappers over the Python API (parse, call, print).

Exit codes: 0 success; 2 bad input (one line on stderr naming the file, the key and the
problem); 1 internal error (a short message asking for a report); 3 the output location
cannot be written (permission, read-only, in use by another run); 4 disk full; 130
interrupted; 143 terminated (docs/errors.md).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from importlib import resources

from harbor import __version__
from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError

EPILOG_TAIL = "Results are preliminary; final design belongs to licensed coastal engineers under local codes."

MAP_EXAMPLE = """example:
  harbor map scenarios/demo.toml --out maps
  harbor map scenarios/demo.toml --sea "storm N" --show height --out maps

Writes, for every sea state: map-<sea>.png, sheet-<sea>.pdf, isolines-<sea>.geojson,
kd-<sea>.tif and height-<sea>.tif (Cloud-Optimised GeoTIFF); and grid.nc (NetCDF-CF),
points.csv and harbor.gpkg (isolines, points, arms, land in the scenario CRS). Nothing
is written if any part fails.
"""

POINTS_EXAMPLE = """example:
  harbor points scenarios/demo.toml
  harbor points scenarios/demo.toml --at 302900 4986150 --at 302980 4986100 --sea "swell NW"
  harbor points scenarios/demo.toml --json

CSV columns: sea,point,x,y,kd,height (+ period_ratio when a random sea is listed), then
limit,ok,valid (valid is false where the method is outside its measured validity);
warnings and the caution go to stderr;
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


SWEEP_EXAMPLE = """example:
  harbor sweep scenarios/demo.toml --arm "west arm" --move -40 60 10 --out screening
  harbor sweep scenarios/demo.toml --arm "east arm" --move 0 50 5 --sea "storm N"

Moves the free head of the arm along its end segment by each distance from MIN to MAX
in steps of STEP metres (positive lengthens the arm and narrows the entrance), solves
every sea state (or --sea) at the scenario's points, and writes sweep-<arm>.csv
(columns move,entrance_width,sea,point,kd,height,limit,ok,valid) and sweep-<arm>.png. Moves
that would make arms cross, put the head in land or shorten the arm past the other end
of its end segment are reported and skipped.
"""

CLIMATE_EXAMPLE = """example:
  harbor climate scenarios/demo.toml --table scenarios/demo-climate.csv --out screening
  harbor climate scenarios/demo.toml --table scenarios/demo-climate.csv \\
      --arm "west arm" --move 30 --out screening-60m

The table is CSV with a header row: height,period,from,percent[,spreading]
(H1/3 in m, T1/3 in s, direction the waves come from in degrees true, percentage of
time; s_max, default 10). Each row is a directional random sea. Writes downtime.csv
(point,limit,total and one column per 30-degree sector, by its centre 000 ... 330),
climate-rows.csv (every row at every point) and downtime.png. With --arm and --move
the head of that arm is first moved as in `harbor sweep`.
"""

COMPARE_EXAMPLE = """several scenarios (layout alternatives):
  harbor climate layout-a.toml layout-b.toml layout-c.toml --table climate.csv --out cmp
  harbor climate layout-*.toml --table climate.csv --scheduler tcp://head-node:8786
  harbor climate harbour-with-alternatives.toml --table climate.csv --out cmp

With two or more scenarios (or one whose file has [[alternative]] tables: variants of
its layout, see docs/screening.md), writes alternatives.csv (alternative,point,limit,
total and one column per sector), alternatives-rows.csv (every row at every point under every
alternative) and alternatives.png (alternatives side by side per berth). Alternatives
are named by their file names; berths are matched by their point names.
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
    return scenario.sea(name, key="--sea").name


def cmd_check(args):
    import numpy as np

    from harbor.solver.assemble import _sea_wavelength, check, grid_coordinates

    sc = _load(args.scenario)
    items, planned = check(sc, method=getattr(args, "method", "auto"), with_plan=True)
    site = sc.site
    print(f"{args.scenario}: valid — {len(sc.layout.arms)} arm(s), {len(sc.layout.lands)} land "
          f"polygon(s), {len(sc.seas)} sea state(s), {len(sc.points)} point(s)")
    depth = f"depth {site.depth:g} m"
    if sc.bathymetry is not None and not sc.bathymetry.is_constant:
        depth = (f"depth from a {sc.bathymetry.kind} survey (still-water level "
                 f"{sc.bathymetry.still_water_level:g} m above chart datum; {site.depth:g} m "
                 f"outside the model)")
    print(f"  CRS {site.crs_code}; meridian convergence at the site {site.convergence_deg:+.3f} deg "
          f"(grid bearing = true bearing - convergence); {depth}")
    from harbor.geometry.entrance import entrance_width
    from harbor.solver.assemble import ground_scenario

    width = entrance_width(ground_scenario(sc).layout)   # ground metres
    if width is not None:
        print(f"  entrance width {width:.1f} m (narrowest water passage between the structures)")
    if sc.grid is not None:
        gx, gy = grid_coordinates(sc.grid)
        step = sc.grid.ground_spacing or sc.grid.spacing
        print(f"  grid {gx.size} x {gy.size} points at {step:g} m (ground)")
    if sc.reflection or sc.footprints:
        walls = ", ".join(f"{k} K_r {v:g}" if np.ndim(v) == 0 else
                          f"{k} K_r {'/'.join(f'{x:g}' for x in v)} (per edge)"
                          for k, v in sc.reflection.items())
        if walls:
            print(f"  reflection: {walls}; every other wall K_r 1")
        if sc.footprints:
            print("  footprints: " + ", ".join(f"{k} {v:g} m" for k, v in sc.footprints.items()))
    print("methods:")
    for s, c in planned:
        L = _sea_wavelength(s, site)
        if c.full_field:
            e = c.estimate or {}
            print(f"  - {s.name}: full-field (L = {L:.1f} m) -- {c.reason}")
            print(f"      estimated {e.get('unknowns', 0):,} unknowns, "
                  f"{e.get('memory', 0) / 2**30:.1f} GB, about {_secs(e.get('seconds', 0))} "
                  f"for {len(e.get('periods', ()))} period(s) (nothing solved yet)")
            if e.get("capped"):
                print(f"      {e['capped']} of its frequency bands are too short for the mesh "
                      f"cap and are solved at a longer period (flagged when they carry "
                      f"more than 5 % of the energy)")
        else:
            print(f"  - {s.name}: {c.method if c.method != 'auto' else 'screening'} "
                  f"(L = {L:.1f} m) -- {c.reason}")
    shown = [n for n in items if n.code != "full-field-planned"]
    _print_item_list(shown, [s.name for s, _ in planned])
    from harbor.cautions import short_caution

    line = short_caution(screening=any(not c.full_field for _, c in planned),
                         full_field=any(c.full_field for _, c in planned))
    print(f"note: {line}")
    return 0


def _secs(seconds):
    from harbor.solver.assemble import _duration

    return _duration(seconds)


def _print_item_list(items, seas, file=None):
    """Notices grouped: those about every sea state first, then each sea state's own."""
    file = file or sys.stdout
    if not items:
        return
    print("warnings:", file=file)
    for n in items:
        if n.sea is None:
            print(f"  - {n.text}", file=file)
    for s in seas:
        own = [n for n in items if n.sea == s]
        if own:
            print(f"  sea state '{s}':", file=file)
            for n in own:
                print(f"    - {n.text}", file=file)


def _print_notices(ds, notices, file=None):
    """The warnings of a result, grouped: every sea state first, then each one's own."""
    _print_item_list(list(dict.fromkeys(notices(ds))), [str(v) for v in ds.sea.values], file)


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


#: CSV of ``harbor points``: the contract columns, then the verdict columns.
POINTS_COLUMNS = ("sea", "point", "x", "y", "kd", "height")
VERDICT_COLUMNS = ("limit", "ok", "valid")


def cmd_points(args):
    from harbor.outputs.read import coordinate_digits
    from harbor.solver.assemble import notices, points_table

    sc = _load(args.scenario)
    sea = _select_sea(sc, args.sea)
    at = _parse_at(args.at)
    rows, ds = points_table(sc, at=at, sea=sea, method=args.method)
    has_random = bool((ds.sea_kind.values == "random").any())
    # the warnings and the caution go to stderr, so stdout stays machine-readable
    _print_notices(ds, notices, file=sys.stderr)
    from harbor.cautions import result_cautions, result_short_caution

    print(f"note: {result_short_caution(ds)}", file=sys.stderr)
    if args.json:
        items = list(dict.fromkeys(notices(ds)))
        print(json.dumps({
            "crs": sc.site.crs_code,
            "method": {str(s): str(m) for s, m in zip(ds.sea.values, ds.sea_method.values)},
            "method_reason": {str(s): str(m) for s, m in zip(ds.sea.values,
                                                            ds.sea_method_reason.values)},
            "rows": rows,
            "warnings": [{"code": n.code, "text": n.text, "sea": n.sea, "point": n.point,
                          "level": n.level} for n in items],
            "cautions": " ".join(result_cautions(ds))}, indent=2))
        return 0
    cols = list(POINTS_COLUMNS) + (["period_ratio"] if has_random else []) + list(VERDICT_COLUMNS)
    import csv

    digits = coordinate_digits(ds)
    w = csv.writer(sys.stdout, lineterminator="\n")
    w.writerow(cols)
    for r in rows:
        out = []
        for c in cols:
            v = r.get(c)
            if isinstance(v, bool):
                out.append("true" if v else "false")
            elif isinstance(v, float):
                if not math.isfinite(v):
                    out.append("")
                elif c in ("kd", "period_ratio"):
                    out.append(f"{v:.4f}")
                elif c in ("height", "limit"):
                    out.append(f"{v:.3f}")
                else:
                    out.append(f"{v:.{digits}f}")
            else:
                out.append("" if v is None else v)
        w.writerow(out)
    return 0


def _run_map(scenario, out, sea=None, show="kd", method="auto", quiet=False):
    from harbor.outputs import point_table, write_all
    from harbor.solver.assemble import solve

    ds = solve(scenario, sea=sea, method=method, progress=_progress_printer(quiet))
    written = write_all(ds, out, show=show)
    # the table ends with the warnings (grouped by sea state) and the cautions: once
    print(point_table(ds))
    print(f"wrote {len(written)} files to {out}:")
    for p in written:
        print(f"  {p}")
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
    if not args.spreading > 0:
        raise InputError(f"--spreading must be positive, got {args.spreading:g}", key="--spreading")
    out = args.out
    suffix = os.path.splitext(out)[1].lower()
    if suffix not in (".png", ".pdf"):
        raise InputError(f"--out must end in .png or .pdf, got '{out}'", key="--out")
    parent = os.path.dirname(os.path.abspath(out))
    if not os.path.isdir(parent):
        raise InputError(f"folder '{parent}' does not exist", key="--out")
    try:
        ds = diagram_field(args.case, args.direction, width=args.width, extent=args.extent,
                           resolution=args.resolution,
                           kind="random" if args.random else "regular",
                           spreading=args.spreading)
    except InputError as e:   # name the option, not the function's argument
        raise InputError(e.problem, key=f"--{e.key}" if e.key else None) from None
    plot_diagram(ds, out)
    print(f"wrote {out} ({ds.attrs['method']})")
    print(f"note: {CAUTION_SHORT}")
    return 0


def _add_method_option(sp):
    sp.add_argument("--method", choices=["auto", "screening", "full-field", "general",
                                         "superposition", "exact", "field"],
                    default="auto",
                    help="method (default auto: the scenario's 'method' key, else per sea "
                         "state the full-field method where the screening methods are "
                         "outside their measured validity or the harbour has a depth survey "
                         "or reflection coefficients, and it fits the machine; screening: "
                         "exact gap solution for narrow classic entrances, Penney & Price "
                         "superposition for wide ones, geometric optics + head diffraction "
                         "for other layouts; full-field: the mild-slope finite-element "
                         "engine; general, superposition, exact: one screening method; "
                         "field: constant-depth finite-element check, regular seas only)")


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
    from harbor.outputs.studies import sweep_text, write_sweep
    from harbor.study.sweep import find_arm, move_range, sweep

    sc = _load(args.scenario)
    sea = _select_sea(sc, args.sea)
    moves = move_range(*args.move)
    find_arm(sc, args.arm)
    table = sweep(sc, args.arm, moves, sea=sea, method=args.method,
                  progress=_progress_printer(args.quiet))
    for m, why in table.attrs["skipped"]:
        print(f"skipped move {m:+g} m: {why}")
    if table.sizes["move"] == 0:
        raise InputError("every move was skipped; nothing to write", file=sc.path,
                         key="--move")
    written = write_sweep(table, args.out)
    widths = table["entrance_width"].values
    print(f"{len(widths)} position(s) of the head of '{args.arm}', entrance width "
          f"{widths.min():.1f} to {widths.max():.1f} m")
    print(sweep_text(table))
    print(table.attrs["verdict"])
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
    sp = subparsers.add_parser(
        "climate", help="berth downtime (%% of time above the limit) from a wave climate table",
        epilog=CLIMATE_EXAMPLE + "\n" + COMPARE_EXAMPLE + "\n" + EPILOG_TAIL,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    sp.add_argument("scenario", nargs="+",
                    help="scenario file(s) (TOML); its points' limits are used; several "
                         "files are compared as layout alternatives")
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
                    help="threads or worker processes at most (default: one per core)")
    sp.add_argument("--executor", choices=["auto", "serial", "threads", "local"],
                    default="auto",
                    help="where the solves run: auto (default: threads, or an embedded "
                         "Dask cluster for long runs), serial, threads, local (embedded "
                         "Dask cluster)")
    sp.add_argument("--scheduler", metavar="ADDRESS",
                    help="an existing Dask scheduler, e.g. tcp://head-node:8786 (default: "
                         "the environment variable HARBOR_SCHEDULER; see docs/cluster.md)")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    sp.add_argument("--max-cases", type=int, metavar="N",
                    help="most distinct (period, direction, spreading) cases to solve "
                         "(default 2000; the count and a time estimate are printed first)")
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
    from harbor.outputs.studies import downtime_text, write_climate
    from harbor.study.climate import (check_case_count, climate_downtime, duplicate_warning,
                                      percent_warning, read_climate)

    paths = args.scenario if isinstance(args.scenario, list) else [args.scenario]
    if len(paths) > 1:
        return _climate_alternatives(args, paths)
    sc = _load(paths[0])
    from harbor.study.alternatives import has_alternatives

    if has_alternatives(paths[0]):
        return _climate_alternatives(args, paths)
    if (args.arm is None) != (args.move is None):
        raise InputError("--arm and --move go together", key="--arm" if args.arm is None
                         else "--move")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers must be at least 1, got {args.workers}", key="--workers")
    table = read_climate(args.table)
    pw = percent_warning(table)
    if pw:
        print(f"warning: {pw}")
    dw = duplicate_warning(table)
    if dw:
        print(f"warning: {dw}")
    print(check_case_count(table, getattr(args, "max_cases", None)))
    try:
        with _climate_executor(args, table, 1) as ex:
            res = climate_downtime(sc, table, method=args.method, workers=args.workers,
                                   arm=args.arm, move=args.move, executor=ex)
    except InputError as e:
        if e.key in ("arm", "move"):  # name the option the user typed
            raise InputError(e.problem, file=e.file, key=f"--{e.key}") from None
        raise
    width = res.attrs["entrance_width"]
    title = None
    if args.arm is not None:
        print(f"head of '{args.arm}' moved {args.move:+g} m: entrance width {width:.1f} m")
        title = f"Berth downtime, head of '{args.arm}' moved {args.move:+g} m " \
                f"(entrance {width:.1f} m)"
    elif width is not None:
        print(f"entrance width (narrowest passage): {width:.1f} m")
        title = f"Berth downtime by wave direction (entrance {width:.1f} m)"
    written = write_climate(res, args.out, title=title)
    print(downtime_text(res))
    print(f"wrote {', '.join(str(p) for p in written)}")
    _print_warnings([w for w in res.attrs["warnings"] if w != pw])
    print(f"note: {CAUTION_SHORT}")
    return 0


def _climate_executor(args, table, n_alternatives):
    """The executor of ``harbor climate`` (connects to a scheduler before any solve)."""
    from harbor.study.alternatives import count_tasks, table_estimate
    from harbor.study.executor import make_executor

    display = not getattr(args, "quiet", False) and sys.stderr.isatty()
    return make_executor(getattr(args, "executor", "auto"),
                         scheduler=getattr(args, "scheduler", None), workers=args.workers,
                         n_tasks=count_tasks(table, n_alternatives),
                         estimate=table_estimate(table), display=display)


def _climate_alternatives(args, paths):
    """``harbor climate A.toml B.toml ...``: compare layout alternatives."""
    from harbor.outputs.alternatives import alternatives_text, write_alternatives
    from harbor.study.alternatives import compare_alternatives
    from harbor.study.climate import percent_warning, read_climate

    if args.arm is not None or args.move is not None:
        raise InputError("--arm and --move apply to one scenario; for several "
                         "alternatives give each layout its own scenario file",
                         key="--arm" if args.arm is not None else "--move")
    from harbor.study.alternatives import load_alternatives

    scs, names = [], []
    for p in paths:
        more, their = load_alternatives(p)
        scs.extend(more)
        names.extend(their)
    if len(set(names)) != len(names):            # the same file name in two folders
        names = None
    table = read_climate(args.table)
    pw = percent_warning(table)
    if pw:
        print(f"warning: {pw}")
    with _climate_executor(args, table, len(scs)) as ex:
        print(f"running on: {ex.describe()}")
        ds = compare_alternatives(scs, table, method=args.method, executor=ex, names=names)
    written = write_alternatives(ds, args.out)
    print(f"{ds.sizes['alternative']} alternatives x {ds.sizes['row']} climate rows: "
          f"{ds.attrs['cases']} distinct solves in {ds.attrs['tasks']} tasks")
    print(alternatives_text(ds))
    print(f"wrote {', '.join(str(p) for p in written)}")
    _print_warnings([w for w in ds.attrs["warnings"] if w != pw])
    print(f"note: {CAUTION_SHORT}")
    return 0


IMPORT_EXAMPLE = """examples:
  harbor import layout.gpkg --arms breakwaters --land shore --points berths \\
      --limit-field limit --depth 9 --out harbour.toml
  harbor import drawing.dxf --crs EPSG:32630 --arms BW --land COAST --points BERTHS \\
      --chord 0.05 --out harbour.toml
  harbor import layout.geojson --arms kind=arm --land kind=land --points kind=berth \\
      --reference --out harbour.toml

A selector is LAYER, LAYER:FIELD=VALUE or FIELD=VALUE. GIS files (GeoPackage, Shapefile,
GeoJSON): layers and attributes. DXF: drawing layers (wildcards * and ?); names, limits
and reflection coefficients from block attributes (points) or extended data of
application HARBOR ("name=west arm") on the linework. The scenario written passes
`harbor check`; its sea state and grid are placeholders to replace.
"""


def add_import_parser(subparsers):
    """Add ``harbor import`` to the command's subparsers.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From ``ArgumentParser.add_subparsers``.

    Returns
    -------
    argparse.ArgumentParser
        The ``import`` parser (its ``func`` default is :func:`cmd_import`).
    """
    # the default is harbor.study.layout_files.DEFAULT_CHORD, written out here so that
    # building the parser imports nothing heavy (start-up time)
    sp = subparsers.add_parser(
        "import", help="write a scenario from a GIS layer or a DXF drawing",
        epilog=IMPORT_EXAMPLE + "\n" + EPILOG_TAIL,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    sp.add_argument("file", help="GeoPackage, Shapefile, GeoJSON or DXF file")
    sp.add_argument("--arms", metavar="SELECTOR", help="where the breakwater arms are")
    sp.add_argument("--land", metavar="SELECTOR", help="where the land polygons are")
    sp.add_argument("--points", metavar="SELECTOR", help="where the points of interest are")
    sp.add_argument("--name-field", default="name", metavar="FIELD",
                    help="attribute holding names (default name; DXF: also 'layer')")
    sp.add_argument("--limit-field", metavar="FIELD",
                    help="attribute holding the points' allowable wave height (m)")
    sp.add_argument("--reflection-field", metavar="FIELD",
                    help="attribute holding reflection coefficients (0-1) of arms and land")
    sp.add_argument("--crs", metavar="CRS",
                    help="CRS of the coordinates when the file has none (e.g. EPSG:32630)")
    sp.add_argument("--chord", type=float, default=None, metavar="M",
                    help="chord tolerance for DXF curves, m (default 0.1)")
    sp.add_argument("--depth", type=float, metavar="M",
                    help="water depth, m (default: a marked placeholder)")
    sp.add_argument("--title", help="scenario title")
    sp.add_argument("--reference", action="store_true",
                    help="refer to the file instead of copying its vertices")
    sp.add_argument("--out", required=True, metavar="FILE", help="scenario file to write")
    sp.add_argument("--force", action="store_true", help="overwrite --out if it exists")
    sp.set_defaults(func=cmd_import)
    return sp


def cmd_import(args):
    """Run ``harbor import``: call :func:`harbor.study.layout_files.import_layout`.

    Parameters
    ----------
    args : argparse.Namespace
        From the parser of :func:`add_import_parser`.

    Returns
    -------
    int
        0; user mistakes raise :class:`harbor.errors.InputError`.
    """
    from harbor.study.layout_files import DEFAULT_CHORD, import_layout

    if args.arms is None and args.land is None and args.points is None:
        raise InputError("give at least one of --arms, --land, --points", key="--arms")
    out, sc = import_layout(args.file, args.out, arms=args.arms, land=args.land,
                            points=args.points, name_field=args.name_field,
                            reflection_field=args.reflection_field,
                            limit_field=args.limit_field, crs=args.crs,
                            chord=DEFAULT_CHORD if args.chord is None else args.chord,
                            depth=args.depth, title=args.title, reference=args.reference,
                            force=args.force)
    print(f"wrote {out}: {len(sc.layout.arms)} arm(s), {len(sc.layout.lands)} land "
          f"polygon(s), {len(sc.points)} point(s) in {sc.site.crs_code}")
    print("the sea state, the grid spacing and (unless --depth) the depth are "
          "PLACEHOLDERS: edit them, then run 'harbor check'")
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

    sp = sub.add_parser("map", help="sheltering maps, PDF sheets, GeoJSON, NetCDF, CSV, GeoTIFF and GeoPackage for every sea state",
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
    method_opt(sp)
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
    add_import_parser(sub)
    add_seiche_parser(sub)
    return p


def main(argv=None):
    """Entry point of the ``harbor`` command; returns the exit code."""
    from harbor.errors import MachineError, Terminated, machine_fault
    from harbor.outputs._atomic import claim_output

    parser = build_parser()
    args = parser.parse_args(argv)
    signals = []
    restore = _on_signals_raise(Terminated, signals)
    try:
        out = getattr(args, "out", None)
        if out is None:
            return int(args.func(args) or 0)
        with claim_output(out, "file" if args.command in ("diagram", "import") else "dir"):
            return int(args.func(args) or 0)
    except InputError as e:
        print(f"harbor: {e.line()}", file=sys.stderr)
        return 2
    except MachineError as e:
        print(f"harbor: {e.line()}", file=sys.stderr)
        return e.exit_code
    except Terminated:
        print("harbor: terminated (SIGTERM); no output written", file=sys.stderr)
        return 143
    except KeyboardInterrupt:
        print("harbor: interrupted; no output written", file=sys.stderr)
        return 130
    except BrokenPipeError:
        return 0
    except Exception as e:
        if signals:
            # the signal's exception was raised inside code that turned it into another
            # one (an extension module being imported reports "initialization failed")
            term = signals[-1] != 2
            print(f"harbor: {'terminated (SIGTERM)' if term else 'interrupted'}; no output "
                  "written", file=sys.stderr)
            return 143 if term else 130
        fault = machine_fault(e) if isinstance(e, OSError) else None
        if fault is None or os.environ.get("HARBOR_DEBUG"):
            return _internal_error(e)
        print(f"harbor: {fault.line()}", file=sys.stderr)
        return fault.exit_code
    finally:
        restore()


def _on_signals_raise(exc_type, seen):
    """Make SIGTERM raise ``exc_type`` and SIGINT ``KeyboardInterrupt`` in the main thread
    (clean-ups run as for Ctrl-C), noting each signal in ``seen``; return the function that
    restores the previous handlers."""
    import signal
    import threading

    if threading.current_thread() is not threading.main_thread():
        return lambda: None

    def handler(signum, frame):
        seen.append(int(signum))
        raise exc_type() if signum == signal.SIGTERM else KeyboardInterrupt()

    old_term = signal.signal(signal.SIGTERM, handler)
    old_int = None
    if signal.getsignal(signal.SIGINT) is signal.default_int_handler:
        old_int = signal.signal(signal.SIGINT, handler)

    def restore():
        signal.signal(signal.SIGTERM, old_term)
        if old_int is not None:
            signal.signal(signal.SIGINT, old_int)

    return restore


def _internal_error(e):  # pragma: no cover - internal errors
    print(f"harbor: internal error ({type(e).__name__}: {e}). This is a bug in harbor "
          f"{__version__}; please report it with the command and the scenario file.",
          file=sys.stderr)
    if os.environ.get("HARBOR_DEBUG"):
        raise e
    return 1


SEICHE_EXAMPLE = """examples:
  harbor seiche scenarios/demo.toml --out seiche
  harbor seiche scenarios/demo.toml --periods 40 400 --count 80 --from 330 --out seiche
  harbor seiche scenarios/demo.toml --at 302900 4986150 --out seiche-quay

Solves the harbour with the full-field method for regular long waves at COUNT periods
from MIN to MAX seconds (evenly spaced in log T; default 60 periods, 30-300 s), waves
from --from degrees true (default the first sea state's direction), and finds the
basin's natural periods as the peaks of its response, each refined by a few more
periods. Writes response.csv (period_s,point,amplification,phase_deg,basin_response,
refined), natural-periods.csv (mode,period_s,basin_response,point,amplification,
share_of_basin_max,position) and response.png, and prints whether each point sits on a
node or an antinode of each natural period. Amplification is |eta| over the incident
amplitude (2 at a straight reflecting coast); the response is linear and undamped, so
peak heights are upper bounds. Walls and beaches reflect long waves fully unless
--reflection scenario. Nothing is written if any part fails.
"""


def add_seiche_parser(subparsers):
    """Add ``harbor seiche`` (the basin's long-period response) to the subparsers.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From ``ArgumentParser.add_subparsers``.

    Returns
    -------
    argparse.ArgumentParser
        The ``seiche`` parser (its ``func`` default is :func:`cmd_seiche`).
    """
    sp = subparsers.add_parser(
        "seiche", help="basin response to long waves: amplification against period, "
                       "natural periods, nodes and antinodes at the points",
        epilog=SEICHE_EXAMPLE + "\n" + EPILOG_TAIL,
        formatter_class=argparse.RawDescriptionHelpFormatter)
    sp.add_argument("scenario", help="scenario file (TOML)")
    sp.add_argument("--periods", nargs=2, type=float, default=[30.0, 300.0],
                    metavar=("MIN", "MAX"), help="period range in s (default 30 300)")
    sp.add_argument("--count", type=int, default=60, metavar="N",
                    help="number of periods, spaced evenly in log T (default 60, at most "
                         "400; each is one full-field solve)")
    sp.add_argument("--from", dest="from_deg", type=float, metavar="DEG",
                    help="direction the waves come from, degrees true (default: the first "
                         "sea state's)")
    sp.add_argument("--at", nargs=2, action="append", metavar=("X", "Y"),
                    help="a point in the scenario's CRS (repeatable); default the "
                         "scenario's points")
    sp.add_argument("--out", default="harbor-out", metavar="DIR",
                    help="output folder (default harbor-out)")
    sp.add_argument("--reflection", choices=["full", "scenario"], default="full",
                    help="full (default): every wall and beach reflects long waves fully, "
                         "as they do in nature; scenario: the scenario's reflection "
                         "coefficients (chosen for wind waves, they damp seiches)")
    sp.add_argument("--quiet", action="store_true", help="no progress bar")
    sp.set_defaults(func=cmd_seiche)
    return sp


def cmd_seiche(args):
    """Run ``harbor seiche``: call :func:`harbor.study.response.response_curve`, write
    the CSV files and the PNG, print the natural periods.

    Parameters
    ----------
    args : argparse.Namespace
        From the parser of :func:`add_seiche_parser`.

    Returns
    -------
    int
        0; user mistakes raise :class:`harbor.errors.InputError`.
    """
    from harbor.outputs.response import response_text, write_response
    from harbor.solver.assemble import notices
    from harbor.study.response import response_curve

    options = {"t_min": "--periods", "t_max": "--periods", "n": "--count",
               "periods": "--periods", "direction": "--from", "points": "--at"}
    t_min, t_max = args.periods
    # the range is checked before the scenario is read or anything is solved
    for v in (t_min, t_max):
        if not (math.isfinite(v) and v > 0):
            raise InputError(f"--periods needs two positive numbers of seconds, got "
                             f"{t_min:g} {t_max:g}", key="--periods")
    if not t_min < t_max:
        raise InputError(f"--periods MIN ({t_min:g} s) must be less than MAX "
                         f"({t_max:g} s)", key="--periods")
    sc = _load(args.scenario)
    at = _parse_at(args.at)
    show = _progress_printer(args.quiet)
    try:
        ds = response_curve(sc, t_min=t_min, t_max=t_max, n=args.count,
                            direction=args.from_deg, points=at or None, progress=show,
                            reflection=args.reflection)
    except InputError as e:   # name the option the user typed
        if e.key in options:
            raise InputError(e.problem, file=e.file, key=options[e.key]) from None
        raise
    written = write_response(ds, args.out)
    print(f"basin response, waves from {ds.attrs['direction_from']:g} deg true, "
          f"{ds.sizes['period']} periods {ds.attrs['t_min']:g}-{ds.attrs['t_max']:g} s "
          f"in {ds.attrs['seconds']:.0f} s")
    print(response_text(ds))
    print(f"wrote {', '.join(str(p) for p in written)}")
    _print_warnings([n.text for n in dict.fromkeys(notices(ds))])
    print(f"note: {ds.attrs.get('caution_short', CAUTION_SHORT)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
