"""Named unit systems."""

from __future__ import annotations

import pytest

from units_of_measure import (
    KINDS,
    UNIT_SYSTEMS,
    UnitError,
    UnitSystem,
    display_units,
    get_kind,
    get_unit_system,
    to_internal,
)


def test_the_three_systems_exist() -> None:
    assert list(UNIT_SYSTEMS) == ["SI", "Metric", "US customary"]


@pytest.mark.parametrize("system_name", ["SI", "Metric", "US customary"])
def test_every_kind_has_an_offered_unit(system_name: str) -> None:
    system = UNIT_SYSTEMS[system_name]
    for kind in KINDS:
        assert system.unit_for(kind) in display_units(kind)


def test_si_units_are_the_internal_units() -> None:
    for kind in KINDS:
        unit = UNIT_SYSTEMS["SI"].unit_for(kind)
        # the internal unit converts with scale 1 and no offset
        assert to_internal(2.5, unit, kind) == 2.5, (kind, unit)
        assert get_kind(kind).display_units[0] == unit


@pytest.mark.parametrize(
    ("system_name", "expected"),
    [
        (
            "SI",
            {
                "molar_flow": "mol/s",
                "mass_flow": "kg/s",
                "temperature": "K",
                "pressure": "Pa",
                "power": "W",
                "molar_enthalpy": "J/mol",
            },
        ),
        (
            "Metric",
            {
                "molar_flow": "kmol/h",
                "mass_flow": "kg/h",
                "temperature": "degC",
                "pressure": "bar",
                "power": "kW",
                "molar_enthalpy": "kJ/mol",
            },
        ),
        (
            "US customary",
            {
                "molar_flow": "lbmol/h",
                "mass_flow": "lb/h",
                "temperature": "degF",
                "pressure": "psia",
                "power": "Btu/h",
                "molar_enthalpy": "Btu/lbmol",
            },
        ),
    ],
)
def test_systems_use_the_agreed_units(system_name: str, expected: dict[str, str]) -> None:
    system = get_unit_system(system_name)
    assert {kind: system.unit_for(kind) for kind in expected} == expected


def test_unknown_system_lists_the_known_ones() -> None:
    with pytest.raises(UnitError) as caught:
        UNIT_SYSTEMS["Imperial"]
    assert str(caught.value) == (
        "unit system: 'Imperial' is not allowed; expected one of: SI, Metric, US customary"
    )
    with pytest.raises(UnitError, match="SI, Metric, US customary"):
        get_unit_system("cgs")
    assert "Imperial" not in UNIT_SYSTEMS


def test_kind_aliases_and_unknown_kinds() -> None:
    assert UNIT_SYSTEMS["Metric"].unit_for("duty") == "kW"
    assert UNIT_SYSTEMS["US customary"].unit_for("ua") == "Btu/h/degF"
    with pytest.raises(UnitError, match="expected one of"):
        UNIT_SYSTEMS["SI"].unit_for("velocity")


def test_a_system_must_cover_every_kind() -> None:
    with pytest.raises(UnitError, match="every kind"):
        UnitSystem("partial", {"temperature": "K"})
