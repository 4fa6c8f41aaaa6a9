"""The layout as text that travels in the result Dataset (attribute ``layout``).

Outputs read only the result; those that draw or export the layout (GIS files) need its
arms and land, so :func:`harbor.solve` stores them here as JSON with WKT geometries in
the work frame. Geometry only.
"""

from __future__ import annotations

import json

import numpy as np
import shapely

from harbor.geometry.layout import Arm, Land, Layout


def layout_record(layout: Layout) -> str:
    """The layout as JSON text: arms and land with WKT in the work frame.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout

    Returns
    -------
    str
        ``{"frame": "work", "arms": [{"name", "wkt", "rooted_start", "rooted_end"}],
        "land": [{"name", "wkt"}]}``; coordinates in metres (work frame) at full
        double precision.

    References
    ----------
    .. [1] Open Geospatial Consortium (2011). OpenGIS Implementation Standard for
       Geographic information - Simple feature access - Part 1: Common architecture,
       1.2.1 (well-known text).
    """
    arms = [{"name": a.name,
             "wkt": shapely.to_wkt(shapely.LineString(np.asarray(a.line, float)),
                                   rounding_precision=-1),
             "rooted_start": bool(a.rooted_start), "rooted_end": bool(a.rooted_end)}
            for a in layout.arms]
    land = [{"name": ld.name, "wkt": shapely.to_wkt(ld.outline, rounding_precision=-1)}
            for ld in layout.lands]
    return json.dumps({"frame": "work", "arms": arms, "land": land},
                      ensure_ascii=False, separators=(",", ":"))


def layout_from_record(text) -> Layout | None:
    """The :class:`~harbor.geometry.layout.Layout` stored by :func:`layout_record`.

    Parameters
    ----------
    text : str or None
        The ``layout`` attribute of a result.

    Returns
    -------
    Layout or None
        None when the text is missing or empty (a result made before the attribute
        existed).
    """
    if not text:
        return None
    d = json.loads(str(text))
    arms = tuple(Arm(name=a["name"], line=np.asarray(shapely.from_wkt(a["wkt"]).coords,
                                                     float),
                     rooted_start=bool(a.get("rooted_start", False)),
                     rooted_end=bool(a.get("rooted_end", False)))
                 for a in d.get("arms", ()))
    lands = tuple(Land(name=ld["name"], outline=shapely.from_wkt(ld["wkt"]))
                  for ld in d.get("land", ()))
    return Layout(arms=arms, lands=lands)
