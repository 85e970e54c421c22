"""Quantities with units: a bare number is taken in the documented unit; a string such as ``"1.2 GW"`` or
``"0.9 USD/W"`` is converted with pint.

Money is its own dimension: the scenario's currency code (``metadata.currency``) is the only currency accepted in
unit strings, so that no exchange rate is applied silently.
"""

from __future__ import annotations

import functools
import re

import pint

__all__ = ["to_unit", "unit_registry", "UnitError"]


class UnitError(ValueError):
    """A quantity string could not be read or converted; the caller adds the file and field."""


@functools.lru_cache(maxsize=1)
def unit_registry() -> pint.UnitRegistry:
    registry: pint.UnitRegistry = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    registry.define("currency = [currency] = cur")
    registry.define("tCO2 = 1000 * kilogram")
    registry.define("tonne_per_year = tonne / year")
    return registry


_CURRENCY_TOKEN = re.compile(r"\b([A-Z]{3})\b")


def to_unit(value: object, unit: str, currency: str = "USD") -> float:
    """Return ``value`` as a float in ``unit``.

    ``unit`` is written with ``currency`` standing for money (e.g. ``"currency/kW"``). A bare number is returned as is.
    """
    if isinstance(value, bool):
        raise UnitError(f"a quantity in {unit}, not a true/false value")
    if isinstance(value, int | float):
        return float(value)
    if not isinstance(value, str):
        raise UnitError(f"a number in {_show(unit, currency)} or a string with a unit")
    text = value.strip()
    try:
        return float(text)
    except ValueError:
        pass

    def replace(match: re.Match) -> str:
        code = match.group(1)
        if code == currency:
            return "currency"
        if code in {"USD", "EUR", "GBP", "JPY", "CNY", "INR", "CHF", "AUD", "CAD", "BRL", "ZAR"}:
            raise UnitError(
                f"money in the scenario's currency {currency!r}, not {code!r} (no exchange rate is applied)"
            )
        return code

    text = _CURRENCY_TOKEN.sub(replace, text)
    registry = unit_registry()
    try:
        quantity: pint.Quantity = registry.Quantity(text)
        return float(quantity.to(registry.parse_units(unit)).magnitude)
    except pint.DimensionalityError:
        raise UnitError(f"a quantity convertible to {_show(unit, currency)}") from None
    except Exception:
        raise UnitError(
            f"a number in {_show(unit, currency)} or a string with a unit such as '1.2 GW'"
        ) from None


def _show(unit: str, currency: str) -> str:
    return unit.replace("currency", currency)
