"""Checks of single specification values, one function per spec field kind.

Each check takes the field's full name (``"Reactor 1.conversion"``), the value as
typed and the flowsheet's component names, and returns the value normalised (for
example a feed composition scaled to sum exactly to 1) or raises an
:class:`~model.errors.InputError` naming the field, the value and what is allowed.
:mod:`model.validation.validate` chooses the check from the block kind's table.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable
from typing import Any

from model.errors import InputError
from model.flowsheet.spec_values import ComponentAmounts, Reaction, TypedQuantity, check_fraction
from model.properties.temperature_range import T_SEARCH_MAX, T_SEARCH_MIN
from units_of_measure.conversion import to_internal
from units_of_measure.errors import UnitError
from units_of_measure.kinds import get_kind
from units_of_measure.parsing import parse_quantity

#: Unit words of compositions and of the separator's split (not pint units).
COMPOSITION_UNITS = ("mole fraction", "mass fraction")
SPLIT_UNITS = ("fraction to first outlet",)
#: A feed composition is normalised when its sum is this close to 1; else refused.
COMPOSITION_SUM_TOLERANCE = 1e-6
#: Largest stoichiometric coefficient, in magnitude (common practice: real reactions have
#: small integers or fractions; beyond this the element balance would lose all precision).
STOICHIOMETRY_LIMIT = 1e6
_OUTLET_PORT = re.compile(r"^out[1-9][0-9]*$")
# The number at the start of typed text such as "-300 degC" (after the typographic minus
# and no-break spaces are made plain, as units_of_measure.parsing does).
_LEADING_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_TYPOGRAPHIC = str.maketrans({"\u2212": "-", "\u00a0": " ", "\u202f": " "})

# Lower limits of quantity kinds in internal units: (limit, inclusive, words).
_LOWER_LIMITS = {
    "temperature": (0.0, False, "above absolute zero"),
    "pressure": (0.0, False, "an absolute pressure above 0 Pa"),
    "pressure_difference": (0.0, True, "zero or positive (a drop; pumps are not modelled)"),
    "temperature_difference": (0.0, True, "zero or positive"),
    "molar_flow": (0.0, True, "zero or positive"),
    "mass_flow": (0.0, True, "zero or positive"),
}


# Upper limits in internal units: (limit, words). Beyond them the arithmetic of a pass
# overflows or the property correlations are extrapolated past any meaning.
_UPPER_LIMITS = {
    "temperature": (T_SEARCH_MAX, f"{T_SEARCH_MAX:g} K, the top of the temperature solve"),
    "pressure": (1e9, "1e9 Pa (10,000 bar), beyond any process plant"),
    "pressure_difference": (1e9, "1e9 Pa (10,000 bar)"),
    "temperature_difference": (T_SEARCH_MAX, f"{T_SEARCH_MAX:g} K"),
    "molar_flow": (1e9, "1e9 mol/s"),
    "mass_flow": (1e9, "1e9 kg/s"),
    "power": (1e13, "1e13 W in magnitude"),
}
#: Temperatures below this are refused: the bottom of the temperature solve's bracket.
LOWEST_TEMPERATURE_K = T_SEARCH_MIN


def physical_range_problem(internal: float, kind: str) -> str | None:
    """What is wrong with a value of ``kind`` in internal units, or None when it is usable.

    Finite always; temperatures within the temperature solve's range
    (10 K to 6000 K); other kinds within the limits of ``_UPPER_LIMITS``.
    """
    description = get_kind(kind).description
    if not math.isfinite(internal):
        return f"{description} must be a finite number after conversion to internal units"
    if kind == "temperature" and internal < LOWEST_TEMPERATURE_K:
        return f"{description} must be at least {LOWEST_TEMPERATURE_K:g} K"
    upper = _UPPER_LIMITS.get(kind)
    if upper is not None:
        limit, words = upper
        magnitude = abs(internal) if kind == "power" else internal
        if magnitude > limit:
            return f"{description} must be at most {words}"
    return None


def check_quantity(name: str, value: Any, kind: str) -> TypedQuantity:
    """A :class:`TypedQuantity` of ``kind`` (``"flow"``: molar or mass) within its range.

    Text as typed (``"25 degC"``) is read by :func:`units_of_measure.parse_quantity` and
    returned as a TypedQuantity in the unit typed; when it is refused, the message keeps
    the unit layer's reason (for example "at or above absolute zero").
    """
    kinds = ("molar_flow", "mass_flow") if kind == "flow" else (kind,)
    words = " or ".join(get_kind(k).expectation.removeprefix("expected ") for k in kinds)
    if isinstance(value, str):
        value = _typed_quantity(name, value, kinds, words)
    if not isinstance(value, TypedQuantity):
        raise InputError(name, value, f"{words}: a number with its unit")
    if kind == "flow":
        try:
            used_kind = flow_kind(value.unit)
        except InputError:
            raise InputError(name, str(value), words) from None
    else:
        used_kind = kind
    internal = to_internal(value.value, value.unit, used_kind, field=name)
    limit, inclusive, limit_words = _LOWER_LIMITS.get(used_kind, (-math.inf, True, ""))
    if internal < limit or (internal == limit and not inclusive):
        raise InputError(
            name, str(value), f"{get_kind(used_kind).description} must be {limit_words}"
        )
    problem = physical_range_problem(internal, used_kind)
    if problem is not None:
        raise InputError(name, str(value), problem)
    return value


def _typed_quantity(name: str, text: str, kinds: tuple[str, ...], words: str) -> TypedQuantity:
    """Typed text as a TypedQuantity of the first of ``kinds`` that reads it.

    Raises
    ------
    InputError
        Naming ``name``, the text and, for a single kind, the unit layer's reason.
    """
    refusals = []
    for kind in kinds:
        try:
            quantity = parse_quantity(text, kind, name)
        except UnitError as error:
            refusals.append(error.allowed)
            continue
        plain = text.translate(_TYPOGRAPHIC).strip()
        number = _LEADING_NUMBER.match(plain)
        unit = plain[number.end() :].strip() if number else f"{quantity.units:~D}"
        return TypedQuantity(float(quantity.magnitude), unit)
    allowed = refusals[0] if len(refusals) == 1 else f"{words}: a number with its unit"
    raise InputError(name, text, allowed)


def flow_kind(unit: str) -> str:
    """``"molar_flow"`` or ``"mass_flow"`` for a flow unit, or raise naming the unit."""
    for kind in ("molar_flow", "mass_flow"):
        try:
            to_internal(1.0, unit, kind)
            return kind
        except InputError:
            continue
    raise InputError(
        "unit", unit, "a molar flow unit (kmol/h, mol/s) or a mass flow unit (kg/h, t/h, lb/h)"
    )


def check_choice(name: str, value: Any, choices: tuple[str, ...]) -> str:
    """One of ``choices``."""
    if value not in choices:
        raise InputError(name, value, "one of: " + ", ".join(repr(c) for c in choices))
    return value


def _check_components(name: str, values: dict, components: list[str]) -> None:
    unknown = [c for c in values if c not in components]
    if unknown:
        known = ", ".join(components) or "none yet; add components first"
        raise InputError(name, unknown[0], f"a component of this case ({known})")


def _finite_number(name: str, value: Any, allowed: str) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(name, value, allowed) from None
    if isinstance(value, bool) or not math.isfinite(number):
        raise InputError(name, value, allowed)
    return number


def check_component_flows(name: str, value: Any, components: list[str]) -> ComponentAmounts:
    """Component flows: known components, zero or positive numbers, a flow unit."""
    if not isinstance(value, ComponentAmounts):
        raise InputError(name, value, "component flows: one number per component and a unit")
    try:
        kind = flow_kind(value.unit)
    except InputError as error:
        raise InputError(f"{name}.unit", value.unit, error.allowed) from None
    _check_components(name, value.values, components)
    for component, amount in value.values.items():
        number = _finite_number(f"{name}[{component}]", amount, "a flow of zero or more")
        if number < 0.0:
            raise InputError(f"{name}[{component}]", amount, "a flow of zero or more")
        internal = to_internal(number, value.unit, kind, field=f"{name}[{component}]")
        problem = physical_range_problem(internal, kind)
        if problem is not None:
            raise InputError(f"{name}[{component}]", f"{amount} {value.unit}", problem)
    return value


def check_composition(name: str, value: Any, components: list[str]) -> ComponentAmounts:
    """Mole or mass fractions of known components, normalised to sum to exactly 1."""
    if not isinstance(value, ComponentAmounts):
        raise InputError(name, value, "fractions: one number per component and a basis")
    if value.unit not in COMPOSITION_UNITS:
        raise InputError(f"{name}.unit", value.unit, "one of: " + ", ".join(COMPOSITION_UNITS))
    _check_components(name, value.values, components)
    fractions = {c: check_fraction(f"{name}[{c}]", v) for c, v in value.values.items()}
    total = sum(fractions.values())
    if abs(total - 1.0) > COMPOSITION_SUM_TOLERANCE:
        raise InputError(
            name,
            f"fractions summing to {total:.8g}",
            f"fractions must sum to 1 (within {COMPOSITION_SUM_TOLERANCE:g})",
        )
    return ComponentAmounts({c: v / total for c, v in fractions.items()}, value.unit)


def check_split(name: str, value: Any, components: list[str]) -> ComponentAmounts:
    """Fraction of each named component to the first outlet, each between 0 and 1."""
    if not isinstance(value, ComponentAmounts):
        raise InputError(name, value, "one fraction per component to the first outlet")
    if value.unit not in SPLIT_UNITS:
        raise InputError(f"{name}.unit", value.unit, "one of: " + ", ".join(SPLIT_UNITS))
    _check_components(name, value.values, components)
    fractions = {}
    for component, fraction in value.values.items():
        try:
            fractions[component] = check_fraction(f"{name}[{component}]", fraction)
        except InputError:
            raise InputError(
                f"{name}[{component}]", fraction, "a split fraction must be between 0 and 1"
            ) from None
    return ComponentAmounts(fractions, value.unit)


def check_port(name: str, value: Any) -> str:
    """An outlet port name of a block with numbered outlets (``out1``, ``out2`` ...)."""
    if not isinstance(value, str) or not _OUTLET_PORT.match(value):
        raise InputError(name, value, "an outlet port such as 'out1' or 'out2'")
    return value


def check_port_fractions(name: str, value: Any) -> dict[str, float]:
    """Outlet port -> fraction, each between 0 and 1, together not above 1."""
    if not isinstance(value, dict):
        raise InputError(name, value, "a fraction for each outlet, e.g. {'out1': 0.98}")
    fractions = {}
    for port, fraction in value.items():
        check_port(f"{name}[{port}]", port)
        fractions[port] = check_fraction(f"{name}[{port}]", fraction)
    total = sum(fractions.values())
    if total > 1.0 + 1e-9:
        raise InputError(
            name,
            f"fractions summing to {total:.8g}",
            "fractions to the outlets must not sum to more than 1",
        )
    return fractions


def check_reactions(
    name: str,
    value: Any,
    components: list[str],
    element_balance: Callable[[dict[str, float]], dict[str, float]] | None,
) -> list[Reaction]:
    """Reactions: known components, key reactant, conversion in [0, 1], element balance.

    ``element_balance(stoichiometry) -> {element: net atoms}`` is ``None`` when the
    components' formulas are not available; then the balance is left to
    ``validate_flowsheet``.
    """
    if not isinstance(value, (list, tuple)) or not value:
        raise InputError(name, value, "a list of one or more reactions")
    reactions = []
    for number, item in enumerate(value, start=1):
        reaction = Reaction.from_dict(item) if isinstance(item, dict) else item
        if not isinstance(reaction, Reaction):
            raise InputError(f"{name}[{number}]", item, "a reaction")
        reactions.append(check_reaction(f"{name}[{number}]", reaction, components, element_balance))
    return reactions


def check_reaction(
    name: str,
    reaction: Reaction,
    components: list[str],
    element_balance: Callable[[dict[str, float]], dict[str, float]] | None,
) -> Reaction:
    """One reaction; see :func:`check_reactions`."""
    label = f" ({reaction.label})" if reaction.label else ""
    stoichiometry = reaction.stoichiometry
    if not isinstance(stoichiometry, dict) or not stoichiometry:
        raise InputError(
            f"{name}.stoichiometry{label}",
            stoichiometry,
            "coefficients per component: negative for reactants, positive for products",
        )
    _check_components(f"{name}.stoichiometry{label}", stoichiometry, components)
    for component, coefficient in stoichiometry.items():
        field = f"{name}.stoichiometry[{component}]{label}"
        within = (
            f"a non-zero coefficient between -{STOICHIOMETRY_LIMIT:g} and {STOICHIOMETRY_LIMIT:g}"
        )
        number = _finite_number(field, coefficient, within)
        if number == 0.0:
            raise InputError(
                field, coefficient, "a non-zero coefficient (leave out components not taking part)"
            )
        if abs(number) > STOICHIOMETRY_LIMIT:
            raise InputError(field, coefficient, within)
    if not any(v < 0 for v in stoichiometry.values()) or not any(
        v > 0 for v in stoichiometry.values()
    ):
        raise InputError(
            f"{name}.stoichiometry{label}",
            stoichiometry,
            "at least one reactant (negative) and one product (positive)",
        )
    reactants = [c for c, v in stoichiometry.items() if v < 0]
    if reaction.key not in reactants:
        raise InputError(
            f"{name}.key{label}",
            reaction.key,
            "the key must be a reactant of the reaction: " + ", ".join(reactants),
        )
    try:
        check_fraction(f"{name}.conversion{label}", reaction.conversion)
    except InputError:
        raise InputError(
            f"{name}.conversion{label}",
            reaction.conversion,
            "conversion must be a fraction between 0 and 1",
        ) from None
    if element_balance is not None:
        # net atoms below 1e-9 of the largest coefficient are rounding; NaN/inf never balance
        allowed = 1e-9 * max(1.0, max(abs(float(v)) for v in stoichiometry.values()))
        imbalance = {
            e: n
            for e, n in element_balance(stoichiometry).items()
            if not math.isfinite(n) or abs(n) > allowed
        }
        if imbalance:
            shown = ", ".join(f"{e} {n:+g}" for e, n in imbalance.items())
            raise InputError(
                f"{name}.stoichiometry{label}",
                stoichiometry,
                f"an element-balanced reaction (net atoms: {shown})",
            )
    return reaction
