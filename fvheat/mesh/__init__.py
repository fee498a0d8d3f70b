"""Meshes: the face-array description and the generators that build it."""

from fvheat.mesh.mesh import Mesh, RectGrid
from fvheat.mesh.select import build_mesh

__all__ = ["Mesh", "RectGrid", "build_mesh"]
