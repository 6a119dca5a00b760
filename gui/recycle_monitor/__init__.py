"""The recycle monitor: residual and q plots per tear, diagnosis and live q bounds."""

from gui.recycle_monitor.monitor import RecycleMonitor

__all__ = ["RecycleMonitor"]
