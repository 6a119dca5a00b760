"""Project-wide test set-up: Qt runs offscreen, with no screen needed."""

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
