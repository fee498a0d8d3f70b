"""Geometry from DXF drawings.

``dxf.py`` reads a drawing (with ezdxf) into the curves on each layer, INSERTed blocks
resolved; ``flatten.py`` turns arcs and bulges into chords; ``outlines.py`` snaps the
curves' ends and assembles closed shapes (outline and holes) and boundary segments;
``survey.py`` summarises every layer (``fvheat layers``); ``polygons.py`` holds the
simple-polygon checks typed polygons share. Nothing here knows about case files: the case
parser (:mod:`fvheat.case.geometry`) converts to metres and maps errors to case keys.
"""
