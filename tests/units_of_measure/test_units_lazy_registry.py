"""The pint registry is built on first use, once, whichever thread asks first.

Issue 14 item 6 and issue 13 item 7: building it at import cost the command line about
200 ms and the window about 0.8 s of its start-up. Each check runs in a fresh
interpreter, since in this one other tests have built the registry already.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pint
import pytest

import units_of_measure
from units_of_measure import registry


def _run(script: str) -> dict:
    """Run ``script`` in a fresh interpreter; it prints one JSON object as its last line."""
    result = subprocess.run(
        [sys.executable, "-c", script], capture_output=True, text=True, check=True
    )
    return json.loads(result.stdout.strip().splitlines()[-1])


def test_importing_the_package_neither_imports_pint_nor_builds_the_registry() -> None:
    script = (
        "import json, sys\n"
        "import units_of_measure\n"
        "from units_of_measure import registry\n"
        "before = {'pint': 'pint' in sys.modules, 'built': registry._registry is not None}\n"
        "# everything that needs no unit arithmetic works without it\n"
        "systems = sorted(units_of_measure.UNIT_SYSTEMS)\n"
        "text = units_of_measure.format_value(298.15)\n"
        "still = registry._registry is not None\n"
        "mol_per_s = units_of_measure.to_internal(3.6, 'kmol/h', 'molar_flow')\n"
        "print(json.dumps({**before, 'still_built': still, 'systems': systems, 'text': text,\n"
        "    'after_pint': 'pint' in sys.modules,\n"
        "    'after_built': registry._registry is units_of_measure.ureg, 'value': mol_per_s}))\n"
    )
    seen = _run(script)
    assert seen["pint"] is False and seen["built"] is False and seen["still_built"] is False
    assert seen["systems"] == ["Metric", "SI", "US customary"] and seen["text"] == "298.15"
    assert seen["after_pint"] is True and seen["after_built"] is True
    assert seen["value"] == pytest.approx(1.0)  # 3.6 kmol/h = 1 mol/s (NIST SP 811: 1 h = 3600 s)


def test_threads_converting_at_once_build_one_registry_and_share_it() -> None:
    script = (
        "import json, threading\n"
        "import units_of_measure\n"
        "from units_of_measure import registry\n"
        "builds = []\n"
        "build = registry._build_registry\n"
        "def counted_build():\n"
        "    builds.append(threading.get_ident())\n"
        "    return build()\n"
        "registry._build_registry = counted_build\n"
        "start = threading.Barrier(8)\n"
        "seen = []\n"
        "def convert(index):\n"
        "    start.wait()\n"
        "    text = ('25 degC', '3.5 barg', '360 kmol/h', '1 MMBtu/h')[index % 4]\n"
        "    kind = ('temperature', 'pressure', 'molar_flow', 'power')[index % 4]\n"
        "    value = units_of_measure.parse_to_internal(text, kind)\n"
        "    seen.append((index, value, id(registry.get_registry())))\n"
        "threads = [threading.Thread(target=convert, args=(i,)) for i in range(8)]\n"
        "for thread in threads: thread.start()\n"
        "for thread in threads: thread.join()\n"
        "print(json.dumps({'builds': len(builds), 'seen': sorted(seen),\n"
        "    'same_as_public': {i for _, _, i in seen} == {id(units_of_measure.ureg)}}))\n"
    )
    result = _run(script)
    assert result["builds"] == 1
    assert result["same_as_public"] is True
    values = {index: value for index, value, _ in result["seen"]}
    assert sorted(values) == list(range(8))
    expected = (
        298.15,  # NIST SP 811: T(K) = T(degC) + 273.15
        451325.0,  # 3.5 bar + 101325 Pa (common practice: gauge reference 1 atm)
        100.0,  # 360 kmol/h = 100 mol/s
        1e6 * 1055.05585262 / 3600.0,  # NIST SP 811: Btu_IT = 1055.05585262 J
    )
    for index, value in values.items():
        assert value == pytest.approx(expected[index % 4], rel=1e-12)


def test_the_public_names_are_the_one_registry_and_its_classes() -> None:
    built = units_of_measure.get_registry()
    assert isinstance(built, pint.UnitRegistry)
    assert units_of_measure.ureg is built is registry.ureg is units_of_measure.get_registry()
    assert units_of_measure.Quantity is built.Quantity and units_of_measure.Unit is built.Unit
    from units_of_measure import Quantity, ureg

    assert ureg is built and Quantity(1.0, "bar").to("Pa").magnitude == 1e5  # NIST SP 811


def test_an_unknown_package_attribute_is_still_an_attribute_error() -> None:
    with pytest.raises(AttributeError, match="no attribute 'ureggg'"):
        _ = units_of_measure.ureggg
    with pytest.raises(AttributeError, match="no attribute 'Quantities'"):
        _ = registry.Quantities
