"""Assembly: vectorised construction of the discrete heat balance from a Case and a Mesh."""

from fvheat.assembly.system import System

__all__ = ["System"]
