"""Clear polarity: what dark copper remains once every clear object has erased what came
before it.  Units: millimetres.

Gerber Layer Format Specification rev. 2024.05, "Load polarity (LP)": objects are laid down
in file order; a dark object darkens its area, a clear object clears everything beneath it
that was made before it, and nothing made after it.  So a dark object's surviving copper is
the object minus the union of the clear objects that come *later in the file* and touch it.
One STRtree over the clear objects finds those touching pairs for all dark objects at once;
each dark object is then cut once by the union of its later clear neighbours.  This gives
the same image as uniting each run of same-polarity objects and applying the runs in order.
"""
from __future__ import annotations

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry
from shapely.strtree import STRtree

from .types import GerberFile, GraphicObject


def resolve_polarity(objects: list[GraphicObject]) -> list[tuple[Polygon, GraphicObject]]:
    """Dark copper left after clear polarity is applied, as single polygons (mm).

    Parameters
    ----------
    objects:
        Graphic objects in file order (``GerberFile.objects``).

    Returns
    -------
    list of (Polygon, GraphicObject)
        Each surviving piece with the dark object that made it, in file order.  Pieces of
        different objects may overlap (each keeps its own net/pin attributes).
    """
    n = len(objects)
    if n == 0:
        return []
    geoms = np.empty(n, dtype=object)
    geoms[:] = [o.geometry if o.geometry is not None else Polygon() for o in objects]
    nonempty = ~shapely.is_empty(geoms)
    is_clear = np.fromiter((o.polarity == "clear" for o in objects), dtype=bool, count=n)
    dark_idx = np.flatnonzero(nonempty & ~is_clear)
    clear_idx = np.flatnonzero(nonempty & is_clear)
    result_geoms = geoms[dark_idx].copy()
    if len(clear_idx) and len(dark_idx):
        tree = STRtree(geoms[clear_idx])
        d_pos, c_pos = tree.query(geoms[dark_idx], predicate="intersects")
        later = clear_idx[c_pos] > dark_idx[d_pos]
        d_pos, c_pos = d_pos[later], c_pos[later]
        if len(d_pos):
            order = np.lexsort((c_pos, d_pos))
            d_pos, c_pos = d_pos[order], c_pos[order]
            starts = np.flatnonzero(np.r_[True, d_pos[1:] != d_pos[:-1]])
            ends = np.r_[starts[1:], len(d_pos)]
            targets = d_pos[starts]
            erasers = np.empty(len(targets), dtype=object)
            clear_geoms = geoms[clear_idx]
            for k, (s, e) in enumerate(zip(starts, ends)):
                if e - s == 1:
                    erasers[k] = clear_geoms[c_pos[s]]
                else:
                    erasers[k] = shapely.union_all(clear_geoms[c_pos[s:e]])
            result_geoms[targets] = shapely.difference(result_geoms[targets], erasers)
    parts, owner = shapely.get_parts(result_geoms, return_index=True)
    if len(parts) == 0:
        return []
    keep = (shapely.get_type_id(parts) == 3) & (shapely.area(parts) > 0)
    out = []
    for part, k in zip(parts[keep], owner[keep]):
        out.append((part, objects[dark_idx[k]]))
    return out


def image(gf: GerberFile) -> BaseGeometry:
    """The whole image of ``gf`` (mm) with polarity applied, as one geometry.

    ``gf.image_negative`` is not applied here: a negative file means "no material where the
    image is dark", which the caller resolves against the board outline.
    """
    runs: list[tuple[str, list]] = []
    for o in gf.objects:
        g = o.geometry
        if g is None or g.is_empty:
            continue
        if runs and runs[-1][0] == o.polarity:
            runs[-1][1].append(g)
        else:
            runs.append((o.polarity, [g]))
    if len(runs) > _MAX_RUNS:
        # many alternations: cut each dark object once, then unite the pieces
        pieces = resolve_polarity(gf.objects)
        if not pieces:
            return Polygon()
        return shapely.union_all(np.array([p for p, _ in pieces], dtype=object))
    acc = Polygon()
    for pol, geoms in runs:
        u = shapely.union_all(np.array(geoms, dtype=object))
        acc = acc.union(u) if pol == "dark" else acc.difference(u)
    return acc


#: Above this many polarity runs :func:`image` unites the resolved pieces instead.
_MAX_RUNS = 16
