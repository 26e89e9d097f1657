"""Studies: many plans at once, swept over axes, on dask, into a zarr store.

Above planning and io (a point is read from its files and planned); below report and cli.
dask, distributed, xarray and zarr come with the ``sweeps`` extra and are imported only
when a study runs.
"""

from cruiseplan.studies.sweep import evaluate_point, point_mission, run_study, template

__all__ = ["evaluate_point", "point_mission", "run_study", "template"]
