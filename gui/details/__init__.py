"""The details pane: specs of the selected block, the selected stream, the components."""

from gui.details.details_pane import DetailsPane

__all__ = ["DetailsPane"]
