"""Figures of a run (matplotlib, Agg, no pyplot): temperature and heat-flux maps, the mesh,
and for transient runs probe temperatures, boundary heat flows and field snapshots."""
