"""The block kinds of DESIGN.md: their ports and the specifications each one takes.

This table is the one place that says what a block of each kind needs. The details
pane draws its editors from it, the case file stores specs by its field names, and the
solve reads the same names. Block calculations live in ``model.blocks``.

Spec field kinds
----------------
- a quantity kind of ``units_of_measure`` ("temperature", "pressure",
  "pressure_difference", "power", "molar_flow", "temperature_difference"), or ``"flow"``
  (a molar or a mass flow): the value is a :class:`~model.flowsheet.spec_values.TypedQuantity`;
- ``"fraction"``: a float in [0, 1];
- ``"choice"``: one of ``choices`` (a string);
- ``"component_flows"``: :class:`~model.flowsheet.spec_values.ComponentAmounts` with a molar- or
  mass-flow unit;
- ``"component_fractions"``: :class:`~model.flowsheet.spec_values.ComponentAmounts` whose unit is
  "mole fraction" or "mass fraction" (feed composition) or "fraction to first outlet"
  (separator split; components not listed go to the second outlet);
- ``"port_fractions"``: ``dict[str, float]``, outlet port name to fraction (splitter;
  one outlet may be left out and takes the remainder);
- ``"port"``: an outlet port name (string);
- ``"reactions"``: ``list[Reaction]``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

PHASES = ("vapor", "liquid")
AS_INLET = "as inlet"
#: A heater outlet whose phase (vapor, liquid or both) comes from the case's phase
#: equilibrium at the outlet's T and P, or at its enthalpy in duty mode.
EQUILIBRIUM = "equilibrium"


@dataclass(frozen=True)
class SpecField:
    """One specification of a block kind.

    ``needed_when`` makes a field required only when another choice field has one of
    the given values, e.g. the heater's outlet temperature only in "outlet temperature"
    mode: ``needed_when=("mode", ("outlet temperature",))``.
    """

    name: str
    label: str
    kind: str
    required: bool = True
    default: Any = None
    choices: tuple[str, ...] = ()
    needed_when: tuple[str, tuple[str, ...]] | None = None
    help: str = ""

    def is_needed(self, specs: dict[str, Any]) -> bool:
        """True when this field must have a value given the block's other specs."""
        if self.needed_when is None:
            return self.required
        other, values = self.needed_when
        return specs.get(other) in values


@dataclass(frozen=True)
class BlockKind:
    """Ports and specification fields of one kind of block.

    Fixed ports are listed by name. A kind with ``variable_inlets`` (Mixer) or
    ``variable_outlets`` (Splitter) numbers its ports ``in1, in2, ...`` or
    ``out1, out2, ...``; it always offers one spare port beyond those connected.
    """

    name: str
    inlets: tuple[str, ...]
    outlets: tuple[str, ...]
    spec_fields: tuple[SpecField, ...]
    description: str
    variable_inlets: bool = False
    variable_outlets: bool = False
    glyph: str = ""

    def field(self, name: str) -> SpecField:
        for spec_field in self.spec_fields:
            if spec_field.name == name:
                return spec_field
        known = ", ".join(f.name for f in self.spec_fields) or "none"
        raise KeyError(f"{self.name} has no specification {name!r}; it has: {known}")

    def default_specs(self) -> dict[str, Any]:
        return {f.name: f.default for f in self.spec_fields if f.default is not None}


_PHASE_OR_INLET = (AS_INLET, *PHASES)


def _phase(name: str = "phase", label: str = "Outlet phase", default: str = AS_INLET) -> SpecField:
    choices = _PHASE_OR_INLET if default == AS_INLET else PHASES
    return SpecField(name, label, "choice", default=default, choices=choices)


def _phase_or_equilibrium(name: str = "phase", label: str = "Outlet phase") -> SpecField:
    return SpecField(
        name,
        label,
        "choice",
        default=AS_INLET,
        choices=(*_PHASE_OR_INLET, EQUILIBRIUM),
        help="'equilibrium': vapor, liquid or both, from the case's property method "
        "(a duty spec then includes the latent heat).",
    )


def _separator_phase(name: str, label: str, default: str) -> SpecField:
    return SpecField(
        name,
        label,
        "choice",
        default=default,
        choices=(*_PHASE_OR_INLET, EQUILIBRIUM),
        help="'equilibrium': the outlet's flash at its temperature and pressure by the "
        "case's property method (vapor, liquid or both).",
    )


def _pressure_drop(name: str = "pressure_drop", label: str = "Pressure drop") -> SpecField:
    return SpecField(
        name, label, "pressure_difference", required=False, help="Leave empty for no pressure drop."
    )


FEED = BlockKind(
    name="Feed",
    inlets=(),
    outlets=("out",),
    spec_fields=(
        SpecField(
            "basis",
            "Flow basis",
            "choice",
            default="component flows",
            choices=("component flows", "total and fractions"),
        ),
        SpecField(
            "flows",
            "Component flows",
            "component_flows",
            needed_when=("basis", ("component flows",)),
        ),
        SpecField(
            "total_flow",
            "Total flow",
            "flow",
            needed_when=("basis", ("total and fractions",)),
            help="A molar or a mass flow.",
        ),
        SpecField(
            "composition",
            "Composition",
            "component_fractions",
            needed_when=("basis", ("total and fractions",)),
            help="Mole or mass fractions; they are normalised if they sum to within 1e-6 of 1.",
        ),
        SpecField("T", "Temperature", "temperature"),
        SpecField("P", "Pressure", "pressure"),
        SpecField("phase", "Phase", "choice", default="vapor", choices=PHASES),
    ),
    description="A stream entering the process at a stated flow, composition and state.",
    glyph="▷",
)

PRODUCT = BlockKind(
    name="Product",
    inlets=("in",),
    outlets=(),
    spec_fields=(),
    description="A stream leaving the process.",
    glyph="◁",
)

MIXER = BlockKind(
    name="Mixer",
    inlets=("in1", "in2"),
    outlets=("out",),
    spec_fields=(
        SpecField(
            "phase",
            "Outlet phase",
            "choice",
            default=AS_INLET,
            choices=(*_PHASE_OR_INLET, EQUILIBRIUM),
            help="'equilibrium': vapor, liquid or both, from the case's property method at "
            "the mixed enthalpy and the outlet pressure (two-phase inlets accepted).",
        ),
        SpecField(
            "P",
            "Outlet pressure",
            "pressure",
            required=False,
            help="Leave empty for the lowest inlet pressure.",
        ),
    ),
    description="Adiabatic mixing of any number of inlets.",
    variable_inlets=True,
    glyph="⋎",
)

SPLITTER = BlockKind(
    name="Splitter",
    inlets=("in",),
    outlets=("out1", "out2"),
    spec_fields=(
        SpecField(
            "mode", "Split by", "choice", default="fractions", choices=("fractions", "outlet flow")
        ),
        SpecField(
            "fractions",
            "Fraction to each outlet",
            "port_fractions",
            needed_when=("mode", ("fractions",)),
            help="One outlet may be left empty; it takes the remainder.",
        ),
        SpecField(
            "flow_port", "Outlet with set flow", "port", needed_when=("mode", ("outlet flow",))
        ),
        SpecField(
            "flow", "Flow of that outlet", "molar_flow", needed_when=("mode", ("outlet flow",))
        ),
    ),
    description="Divides one stream into outlets of the same composition and state.",
    variable_outlets=True,
    glyph="⋏",
)

SEPARATOR = BlockKind(
    name="Separator",
    inlets=("in",),
    outlets=("out1", "out2"),
    spec_fields=(
        SpecField(
            "split",
            "Fraction of each component to the first outlet",
            "component_fractions",
            help="Components not listed go wholly to the second outlet.",
        ),
        SpecField(
            "T1",
            "First outlet temperature",
            "temperature",
            required=False,
            help="Leave empty for the inlet temperature.",
        ),
        SpecField(
            "P1",
            "First outlet pressure",
            "pressure",
            required=False,
            help="Leave empty for the inlet pressure.",
        ),
        _separator_phase("phase1", "First outlet phase", default="liquid"),
        SpecField(
            "T2",
            "Second outlet temperature",
            "temperature",
            required=False,
            help="Leave empty for the inlet temperature.",
        ),
        SpecField(
            "P2",
            "Second outlet pressure",
            "pressure",
            required=False,
            help="Leave empty for the inlet pressure.",
        ),
        _separator_phase("phase2", "Second outlet phase", default="vapor"),
    ),
    description="Sends a stated fraction of each component to the first outlet; reports the duty.",
    glyph="⫶",
)

REACTOR = BlockKind(
    name="Reactor",
    inlets=("in",),
    outlets=("out",),
    spec_fields=(
        SpecField(
            "reactions",
            "Reactions",
            "reactions",
            help="Applied in order; each converts a fraction of its key reactant.",
        ),
        SpecField(
            "mode",
            "Energy specification",
            "choice",
            default="outlet temperature",
            choices=("outlet temperature", "adiabatic", "duty"),
        ),
        SpecField(
            "T", "Outlet temperature", "temperature", needed_when=("mode", ("outlet temperature",))
        ),
        SpecField(
            "duty",
            "Duty",
            "power",
            needed_when=("mode", ("duty",)),
            help="Heat added to the reactor; negative for heat removed.",
        ),
        _phase_or_equilibrium(),
        _pressure_drop(),
    ),
    description="Reactions at fixed fractional conversion of a key reactant.",
    glyph="⚗",
)

HEATER = BlockKind(
    name="Heater",
    inlets=("in",),
    outlets=("out",),
    spec_fields=(
        SpecField(
            "mode",
            "Specification",
            "choice",
            default="outlet temperature",
            choices=("outlet temperature", "duty"),
        ),
        SpecField(
            "T", "Outlet temperature", "temperature", needed_when=("mode", ("outlet temperature",))
        ),
        SpecField(
            "duty",
            "Duty",
            "power",
            needed_when=("mode", ("duty",)),
            help="Heat added; negative for a cooler.",
        ),
        _phase_or_equilibrium(),
        _pressure_drop(),
    ),
    description="Heats or cools one stream (a cooler is a heater with negative duty).",
    glyph="≋",
)

EXCHANGER = BlockKind(
    name="Exchanger",
    inlets=("hot_in", "cold_in"),
    outlets=("hot_out", "cold_out"),
    spec_fields=(
        SpecField(
            "mode",
            "Specification",
            "choice",
            default="cold outlet temperature",
            choices=("hot outlet temperature", "cold outlet temperature", "duty"),
        ),
        SpecField(
            "hot_T",
            "Hot outlet temperature",
            "temperature",
            needed_when=("mode", ("hot outlet temperature",)),
        ),
        SpecField(
            "cold_T",
            "Cold outlet temperature",
            "temperature",
            needed_when=("mode", ("cold outlet temperature",)),
        ),
        SpecField(
            "duty", "Duty (heat from hot to cold side)", "power", needed_when=("mode", ("duty",))
        ),
        _phase_or_equilibrium("hot_phase", "Hot outlet phase"),
        _phase_or_equilibrium("cold_phase", "Cold outlet phase"),
        SpecField(
            "minimum_approach",
            "Minimum approach",
            "temperature_difference",
            required=False,
            help="Warn when either end's approach is below this.",
        ),
        _pressure_drop("hot_pressure_drop", "Hot side pressure drop"),
        _pressure_drop("cold_pressure_drop", "Cold side pressure drop"),
    ),
    description="Counter-current two-stream exchanger; reports LMTD and UA.",
    glyph="⇄",
)

FLASH_MODES = ("temperature", "duty", "vapor fraction")

FLASH_DRUM = BlockKind(
    name="Flash drum",
    inlets=("in",),
    outlets=("vapor", "liquid"),
    spec_fields=(
        SpecField(
            "mode",
            "Specification (with the pressure)",
            "choice",
            default="temperature",
            choices=FLASH_MODES,
        ),
        SpecField("T", "Temperature", "temperature", needed_when=("mode", ("temperature",))),
        SpecField(
            "P",
            "Pressure",
            "pressure",
            required=False,
            help="Leave empty for the inlet pressure.",
        ),
        SpecField(
            "duty",
            "Duty",
            "power",
            needed_when=("mode", ("duty",)),
            help="Heat added; 0 for an adiabatic flash.",
        ),
        SpecField(
            "vapor_fraction",
            "Vapor fraction",
            "fraction",
            needed_when=("mode", ("vapor fraction",)),
            help="Moles of vapor per mole of feed: 0 at the bubble point, 1 at the dew point.",
        ),
    ),
    description="Vapor-liquid equilibrium at the drum's T and P (or duty, or vapor "
    "fraction) by the case's property method; reports the split and the duty.",
    glyph="◒",
)

BLOCK_KINDS: dict[str, BlockKind] = {
    kind.name: kind
    for kind in (
        FEED,
        PRODUCT,
        MIXER,
        SPLITTER,
        SEPARATOR,
        FLASH_DRUM,
        REACTOR,
        HEATER,
        EXCHANGER,
    )
}


def block_kind(name: str) -> BlockKind:
    """The block kind called ``name``; an unknown name lists the known ones."""
    from units_of_measure.errors import InputError

    try:
        return BLOCK_KINDS[name]
    except KeyError:
        raise InputError("kind", name, "a block kind is one of " + ", ".join(BLOCK_KINDS)) from None
