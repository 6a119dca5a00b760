"""Reading and writing case files (``*.loop.json``), Loopwright's own JSON format.

The format is described field by field in ``examples/README.md``. Loading checks the
whole file and reports every problem at once in one :class:`~model.errors.CaseFileError`
(JSON path, value found, what is allowed); a file of an older format version is migrated
(``model.case.migrate``), a newer one is refused. Saving is atomic and keeps the
previous file as ``NAME.loop.json.bak``.
"""

from __future__ import annotations

import contextlib
import glob
import json
import os
import tempfile
import time
from pathlib import Path
from typing import Any

from convergence.settings import SolverSettings
from model.case.document import DEFAULT_METHOD, DEFAULT_UNIT_SYSTEM, Case
from model.case.flowsheet_part import read_flowsheet
from model.case.migrate import CURRENT_VERSION, OLDEST_VERSION, migrate
from model.case.property_data_part import property_data_to_json, read_property_data
from model.case.results_part import read_results
from model.case.schema import MISSING, Problems, join, json_object_hook
from model.case.specs import spec_to_json
from model.case.targets_part import read_targets, targets_to_json
from model.errors import CaseFileError, CaseProblem
from model.flowsheet.document import Block, Flowsheet, Stream
from model.limits import NOTES_LENGTH_LIMIT, TITLE_LENGTH_LIMIT

CASE_FORMAT = "loopwright-case"
CASE_VERSION = CURRENT_VERSION
CASE_SUFFIX = ".loop.json"
BACKUP_SUFFIX = ".bak"
_UMASK = os.umask(0o022)  # read the process umask once (setting it back at once)
os.umask(_UMASK)

TOP_KEYS = (
    "format",
    "version",
    "title",
    "notes",
    "unit_system",
    "method",
    "solver_settings",
    "property_method",
    "property_data",  # version 3 on (model/case/property_data_part.py)
    "components",
    "blocks",
    "streams",
    "results",
    "targets",  # version 2 on (model/case/targets_part.py)
)


# ---- writing ----------------------------------------------------------------------
def case_to_dict(case: Case) -> dict[str, Any]:
    """The JSON-able data of ``case`` in the current format version."""
    flowsheet = case.flowsheet
    data: dict[str, Any] = {
        "format": CASE_FORMAT,
        "version": CASE_VERSION,
        "title": case.title,
        "notes": case.notes,
        "unit_system": case.unit_system,
        "method": case.method,
        "solver_settings": case.settings.to_dict(),
        "property_method": flowsheet.property_method,
        "components": [component.to_dict() for component in flowsheet.components],
        "property_data": property_data_to_json(flowsheet),
        "blocks": [_block_to_dict(block) for block in flowsheet.blocks.values()],
        "streams": [_stream_to_dict(stream) for stream in flowsheet.streams.values()],
        "targets": targets_to_json(flowsheet.targets),
    }
    if case.solution is not None:
        data["results"] = case.solution.to_dict()
    return data


def _block_to_dict(block: Block) -> dict[str, Any]:
    return {
        "kind": block.kind,
        "name": block.name,
        "position": [float(block.position[0]), float(block.position[1])],
        "specs": {name: spec_to_json(value) for name, value in block.specs.items()},
    }


def _stream_to_dict(stream: Stream) -> dict[str, Any]:
    return {
        "name": stream.name,
        "from": {"block": stream.source, "port": stream.source_port},
        "to": {"block": stream.target, "port": stream.target_port},
        "preferred_tear": stream.preferred_tear,
        "estimate": None if stream.estimate is None else stream.estimate.to_dict(),
        "number": stream.number,
        **({"bends": [[x, y] for x, y in stream.bends]} if stream.bends else {}),
    }


def case_to_json(case: Case) -> str:
    """The text of a case file for ``case`` (UTF-8, indented, strict JSON)."""
    try:
        return json.dumps(case_to_dict(case), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    except ValueError as error:
        problem = CaseProblem(
            "(case)", case.title, f"a case whose numbers are all finite ({error})"
        )
        raise CaseFileError("case data", [problem]) from None


def save_case(case: Case, path: str | os.PathLike[str]) -> None:
    """Write ``case`` to ``path`` atomically, keeping the previous file as ``path + ".bak"``.

    The text goes to a temporary file in the same folder, which is flushed and synced to
    disk and then renamed over ``path``; an interruption at any point leaves the previous
    file whole. Raises :class:`CaseFileError` when the file cannot be written.
    """
    target = Path(path)
    text = case_to_json(case)
    try:
        _remove_stale_temporaries(target)
        _write_atomically(target, text.encode("utf-8"))
    except OSError as error:
        problem = CaseProblem("(file)", str(target), f"a file that can be written ({error})")
        raise CaseFileError(str(target), [problem]) from None


#: A temporary file of an earlier save older than this was left by an interrupted save.
STALE_TEMPORARY_SECONDS = 60.0


def _remove_stale_temporaries(target: Path) -> None:
    """Remove ``.NAME.*.tmp`` (and the backup's) left beside ``target`` by a save that was
    interrupted; a temporary younger than a minute may belong to a save still running."""
    folder = target.resolve().parent
    now = time.time()
    for prefix in (f".{target.name}.", f".{target.name}{BACKUP_SUFFIX}."):
        for leftover in folder.glob(glob.escape(prefix) + "*.tmp"):
            with contextlib.suppress(OSError):
                if now - leftover.stat().st_mtime > STALE_TEMPORARY_SECONDS:
                    leftover.unlink()


def _file_mode(target: Path) -> int:
    """The previous file's permissions, or the usual ones for a new file (0o666 less umask)."""
    try:
        return target.stat().st_mode & 0o777
    except OSError:
        return 0o666 & ~_UMASK


def write_file_atomically(path: str | os.PathLike[str], payload: bytes) -> None:
    """Write ``payload`` to ``path`` through a synced temporary file in the same folder
    and a rename, so the file is either the old one or the whole new one (exports).

    Raises :class:`OSError` when the file cannot be written; nothing is left behind.
    """
    _write_atomically(Path(path), payload, keep_backup=False)


def _write_atomically(target: Path, payload: bytes, keep_backup: bool = True) -> None:
    folder = target.resolve().parent
    mode = _file_mode(target)
    handle, temporary = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    try:
        os.chmod(temporary, mode)  # mkstemp makes the file private (0o600)
        with os.fdopen(handle, "wb") as stream:
            stream.write(payload)
            stream.flush()
            os.fsync(stream.fileno())
        if keep_backup and target.exists():
            _keep_backup(target)
        os.replace(temporary, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise
    _sync_folder(folder)


def _keep_backup(target: Path) -> None:
    """Copy the current file to ``NAME.bak`` (itself atomically) before it is replaced."""
    backup = target.with_name(target.name + BACKUP_SUFFIX)
    handle, temporary = tempfile.mkstemp(
        prefix=f".{backup.name}.", suffix=".tmp", dir=target.resolve().parent
    )
    try:
        os.chmod(temporary, _file_mode(target))
        with os.fdopen(handle, "wb") as stream:
            stream.write(target.read_bytes())
            stream.flush()
            os.fsync(stream.fileno())
        os.replace(temporary, backup)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise


def _sync_folder(folder: Path) -> None:
    """Make the rename itself durable (not possible on every platform; skipped there)."""
    with contextlib.suppress(OSError, AttributeError):
        descriptor = os.open(folder, os.O_RDONLY)
        try:
            os.fsync(descriptor)
        finally:
            os.close(descriptor)


# ---- reading ----------------------------------------------------------------------
def load_case(path: str | os.PathLike[str]) -> Case:
    """Read and check a case file; raise :class:`CaseFileError` listing every problem.

    Examples
    --------
    >>> case = load_case("examples/ammonia_synthesis_loop.loop.json")  # doctest: +SKIP
    >>> sorted(case.flowsheet.blocks)[:2]  # doctest: +SKIP
    ['Cooler', 'Feed']
    """
    source = str(path)
    try:
        raw = Path(path).read_bytes()
    except OSError as error:
        problem = CaseProblem("(file)", source, f"a readable case file ({error.strerror})")
        raise CaseFileError(source, [problem]) from None
    return case_from_json(raw, source)


def case_from_json(text: str | bytes, source: str = "case data") -> Case:
    """Read a case from the text of a case file (see :func:`load_case`)."""
    try:
        if isinstance(text, bytes):
            text = text.decode("utf-8-sig")
        data = json.loads(text, object_pairs_hook=json_object_hook)
    except UnicodeDecodeError as error:
        problem = CaseProblem(
            f"(byte {error.start})",
            error.object[error.start : error.start + 8],
            "a case file is UTF-8 text",
        )
        raise CaseFileError(source, [problem]) from None
    except (json.JSONDecodeError, RecursionError) as error:
        where = (
            f"(line {error.lineno}, column {error.colno})"
            if isinstance(error, json.JSONDecodeError)
            else "(whole file)"
        )
        problem = CaseProblem(where, _excerpt(text, error), f"valid JSON ({_reason(error)})")
        raise CaseFileError(source, [problem]) from None
    return case_from_dict(data, source)


def _excerpt(text: str, error: Exception) -> str:
    position = getattr(error, "pos", 0) or 0
    return text[max(0, position - 20) : position + 20]


def _reason(error: Exception) -> str:
    return getattr(error, "msg", None) or "nested too deeply"


def case_from_dict(data: Any, source: str = "case data") -> Case:
    """Check ``data`` (parsed JSON of a case file) and build the case.

    Raises :class:`CaseFileError` with every problem found; any unexpected failure while
    reading also becomes a ``CaseFileError``, never another exception.
    """
    try:
        return _case_from_dict(data, source)
    except CaseFileError:
        raise
    except Exception as error:  # bad input must never surface as a traceback
        problem = CaseProblem(
            "(case)", type(error).__name__, f"a case file this version can read ({error})"
        )
        raise CaseFileError(source, [problem]) from None


def _case_from_dict(data: Any, source: str) -> Case:
    problems = Problems()
    data = _checked_header(data, source, problems)
    problems.object("", data, known=TOP_KEYS, required=("components", "blocks", "streams"))
    case = Case(
        flowsheet=Flowsheet(),
        settings=_read_settings(problems, data.get("solver_settings", {})),
        method=_read_method(problems, data.get("method", DEFAULT_METHOD)),
        unit_system=_read_unit_system(problems, data.get("unit_system", DEFAULT_UNIT_SYSTEM)),
        title=problems.text("title", data.get("title", ""), limit=TITLE_LENGTH_LIMIT) or "",
        notes=problems.text("notes", data.get("notes", ""), limit=NOTES_LENGTH_LIMIT) or "",
    )
    read_flowsheet(problems, data, case.flowsheet)
    case.flowsheet.targets = read_targets(problems, data.get("targets", MISSING))
    _read_property_method(problems, data.get("property_method", "ideal"), case.flowsheet)
    if not problems:
        _read_property_data(problems, data.get("property_data", MISSING), case.flowsheet)
    if not problems and data.get("results") is not None:
        case.solution = read_results(problems, data["results"], case.flowsheet)
    if problems:
        raise CaseFileError(source, problems.items)
    return case


def _read_property_method(problems: Problems, value: Any, flowsheet: Flowsheet) -> None:
    """The optional "property_method" (absent in older files: "ideal")."""
    from model.properties.property_method import PROPERTY_METHODS

    name = problems.choice("property_method", value, PROPERTY_METHODS)
    if name is not None:
        flowsheet.set_property_method(name)


def _read_property_data(problems: Problems, value: Any, flowsheet: Flowsheet) -> None:
    """The recorded constants of the property method; what the file lacks (all of it in
    a file older than version 3) is taken from the libraries now and recorded."""
    from model.properties.property_data import completed

    recorded = read_property_data(problems, value, flowsheet)
    flowsheet.property_data = completed(recorded, flowsheet.components, flowsheet.property_method)


def _checked_header(data: Any, source: str, problems: Problems) -> dict[str, Any]:
    """Check format and version (refusing outright what cannot be read); migrate old files."""
    if not isinstance(data, dict):
        raise CaseFileError(
            source, [CaseProblem("(top level)", data, "a case file holds one JSON object {...}")]
        )
    if data.get("format") != CASE_FORMAT:
        allowed = f'a case file starts with "format": "{CASE_FORMAT}"'
        raise CaseFileError(source, [CaseProblem("format", data.get("format"), allowed)])
    version = data.get("version")
    if isinstance(version, bool) or not isinstance(version, int):
        raise CaseFileError(source, [CaseProblem("version", version, "a whole number")])
    if version > CASE_VERSION:
        allowed = (
            f"this Loopwright reads case files up to version {CASE_VERSION}; "
            "the file was written by a newer version: open it with that one"
        )
        raise CaseFileError(source, [CaseProblem("version", version, allowed)])
    if version < OLDEST_VERSION:
        allowed = f"a version from {OLDEST_VERSION} to {CASE_VERSION}"
        raise CaseFileError(source, [CaseProblem("version", version, allowed)])
    return migrate(data, version)


def _read_method(problems: Problems, value: Any) -> str:
    from convergence import METHODS

    return problems.choice("method", value, METHODS) or DEFAULT_METHOD


def _read_unit_system(problems: Problems, value: Any) -> str:
    from units_of_measure import UNIT_SYSTEMS

    return problems.choice("unit_system", value, UNIT_SYSTEMS) or DEFAULT_UNIT_SYSTEM


def _read_settings(problems: Problems, value: Any) -> SolverSettings:
    """Solver settings; each bad value is reported and left at its default."""
    values = problems.object("solver_settings", value)
    if values is None:
        return SolverSettings()
    remaining = dict(values)
    for _ in range(len(values) + 1):
        try:
            return SolverSettings.from_dict(remaining)
        except ValueError as error:
            name = getattr(error, "value", None) if isinstance(error, KeyError) else None
            name = name if name in remaining else getattr(error, "field", None)
            if name not in remaining:
                problems.add_error("solver_settings", error)
                break
            problems.add_error(join("solver_settings", name), error, remaining.pop(name))
    return SolverSettings()
