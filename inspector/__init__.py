"""inspector: acceptance sampling of physical lots by attributes.

Layers (data flows one way, top to bottom):

* ``inspector.cli``, ``inspector.tui`` -- thin front ends;
* ``inspector.workflow`` -- the lot lifecycle, the one place rules live;
* ``inspector.sheets`` -- PDF worksheets, driven by ``forms/``;
* ``inspector.records`` -- the SQLite store and its audit chain;
* ``inspector.stats``, ``inspector.frame`` -- the pure core (no I/O).
"""

__version__ = "0.1.0"
