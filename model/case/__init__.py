"""The case file (``*.loop.json``): the case, its schema, reading, writing, migration."""

from model.case.document import DEFAULT_METHOD, DEFAULT_UNIT_SYSTEM, Case
from model.case.file import CASE_SUFFIX, case_from_json, case_to_json, load_case, save_case
from model.case.migrate import CURRENT_VERSION

__all__ = [
    "CASE_SUFFIX",
    "CURRENT_VERSION",
    "DEFAULT_METHOD",
    "DEFAULT_UNIT_SYSTEM",
    "Case",
    "case_from_json",
    "case_to_json",
    "load_case",
    "save_case",
]
