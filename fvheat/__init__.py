"""fvheat: 2-D finite-volume heat transfer for building junctions.

The data flow is case file → :class:`~fvheat.case.model.Case` → :class:`~fvheat.mesh.Mesh`
→ :class:`~fvheat.assembly.System` → solve → :class:`~fvheat.simulate.Solution` → outputs.
"""

__version__ = "0.1.0"
