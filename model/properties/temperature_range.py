"""The temperature range the property basis is used over: the bracket of the
temperature-from-enthalpy solve, and the range every temperature spec must lie in.

Kept in a module of its own (no imports) so the spec checks of the flowsheet document can
use it without loading the component data.
"""

T_SEARCH_MIN = 10.0  # K, bottom of the temperature_from_enthalpy bracket
T_SEARCH_MAX = 6000.0  # K, its top
