"""The case file (``*.loop.json``): the case, its schema, reading, writing, migration."""

from model.lazy import lazy_face

__getattr__, __dir__, __all__ = lazy_face(
    __name__,
    {
        "CASE_SUFFIX": "model.case.file",
        "CURRENT_VERSION": "model.case.migrate",
        "Case": "model.case.document",
        "DEFAULT_METHOD": "model.case.document",
        "DEFAULT_UNIT_SYSTEM": "model.case.document",
        "case_from_json": "model.case.file",
        "case_to_json": "model.case.file",
        "load_case": "model.case.file",
        "save_case": "model.case.file",
    },
)
