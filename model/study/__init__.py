"""Studies over a case: sweeps of one or two specs, run here, on a process pool or on Dask."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "SweepPlan": "model.study.sweep_definition",
        "SweepResult": "model.study.sweep_run",
        "Variation": "model.study.sweep_definition",
        "parse_record": "model.study.sweep_definition",
        "parse_variation": "model.study.sweep_definition",
        "run_sweep": "model.study.sweep_run",
        "solve_run": "model.study.sweep_point",
        "sweep_csv": "model.study.sweep_csv",
    },
)
