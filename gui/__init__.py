"""The PySide6 window of Loopwright."""
