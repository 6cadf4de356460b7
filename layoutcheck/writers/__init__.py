"""Writers of fab files from a plain :class:`~layoutcheck.writers.design.Design`.

For sample boards and tests only; the package's readers never import them.
Units: millimetres.
"""
from .design import (Design, NonPlatedHole, Pad, PadTemplate, Part, Slot, Track, Via, Zone,
                     place_pads, zones_from_geometry)
from .drill import drill_text, write_drill
from .gerber import GerberWriter, gerber_layer_text, write_gerbers

__all__ = ["Design", "NonPlatedHole", "Pad", "PadTemplate", "Part", "Slot", "Track", "Via",
           "Zone", "place_pads", "zones_from_geometry", "drill_text", "write_drill",
           "GerberWriter", "gerber_layer_text", "write_gerbers"]
