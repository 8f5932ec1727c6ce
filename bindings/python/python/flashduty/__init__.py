"""flashduty: the Rachford-Rice isothermal flash and heater duty of ideal (Raoult's-law)
mixtures, with an immiscible water phase, from Python.

Cases take the keys of the command-line tool's case files (docs/CLI.md), as keyword
arguments or a dict, with units as text ("65 degC", "1 atm", "3.6 kmol/h") or SI floats:

    >>> import flashduty
    >>> r = flashduty.bubble(components=["benzene", "toluene"], z=[0.5, 0.5], P="1 atm")
    >>> 353.2 < r.T_K < 383.8
    True

Results carry the JSON object's keys as attributes and items, and ``to_dict()``. Errors
raise ``FlashdutyError`` with the stable ``kind`` and the ``field``. The batch calls
(``flash_batch``, ``rachford_rice_batch``, ``duty_batch``) take NumPy arrays in SI units,
release the GIL and run in parallel.

Caution: results are estimates from ideal-mixture models. Check that the models suit your
mixture and conditions; equipment design and operation follow the applicable local codes
and the judgement of a qualified, licensed engineer.
"""

import copy
import json

import numpy as np

from . import _flashduty
from ._flashduty import CAUTION, Library

__all__ = [
    "CAUTION",
    "FlashdutyError",
    "Library",
    "Result",
    "azeotropes",
    "bubble",
    "curve",
    "dew",
    "duty",
    "duty_batch",
    "flash",
    "flash_batch",
    "outlet_for_duty",
    "rachford_rice_batch",
]

PHASES = ("liquid", "vapour", "two-phase")
"""The phase codes of the batch calls' ``phase`` arrays: 0, 1 and 2."""


class FlashdutyError(ValueError):
    """A case or input flashduty refuses: ``kind`` is the stable kebab-case kind (the same
    as the command-line tool's JSON errors), ``field`` the field named (or None)."""

    def __init__(self, kind, field, message):
        super().__init__(message)
        self.kind = kind
        self.field = field or None


class Result:
    """A result: the keys of the outcome's JSON object (docs/CLI.md) as attributes and
    items; nested objects are Results too. ``to_dict()`` gives the JSON object."""

    def __init__(self, data):
        self._data = data

    def __getattr__(self, name):
        try:
            value = self._data[name]
        except KeyError:
            raise AttributeError(name) from None
        return Result(value) if isinstance(value, dict) else value

    def __getitem__(self, key):
        value = self._data[key]
        return Result(value) if isinstance(value, dict) else value

    def __contains__(self, key):
        return key in self._data

    def keys(self):
        return self._data.keys()

    def to_dict(self):
        """The JSON object, as plain dicts and lists (a copy)."""
        return copy.deepcopy(self._data)

    def __repr__(self):
        keys = ", ".join(list(self._data)[:6])
        return f"Result({keys}{', ...' if len(self._data) > 6 else ''})"


def _native(function, *args, **kwargs):
    try:
        return function(*args, **kwargs)
    except ValueError as e:
        if len(e.args) == 3 and all(isinstance(a, str) for a in e.args):
            kind, field, message = e.args
            raise FlashdutyError(kind, field, message) from None
        raise


def _run(command, case, keys, library):
    data = dict(case or {})
    data.update(keys)
    try:
        text = json.dumps(data, allow_nan=False)
    except (TypeError, ValueError) as e:
        raise FlashdutyError("invalid-case", None, f"case: {e}") from None
    return Result(json.loads(_native(_flashduty.run_case, command, text, library)))


def flash(case=None, /, *, library=None, **keys):
    """The flash of a case: T and P, T or P with vapour_fraction, or z and K."""
    return _run("flash", case, keys, library)


def bubble(case=None, /, *, library=None, **keys):
    """The bubble point at T or P."""
    return _run("bubble", case, keys, library)


def dew(case=None, /, *, library=None, **keys):
    """The dew point at T or P."""
    return _run("dew", case, keys, library)


def duty(case=None, /, *, library=None, **keys):
    """The heater duty between an inlet and an outlet state (or the outlet for a duty)."""
    return _run("duty", case, keys, library)


def outlet_for_duty(case=None, /, *, library=None, **keys):
    """The duty-specified flash: the outlet at outlet.P after ``duty`` is added."""
    data = dict(case or {})
    data.update(keys)
    if "duty" not in data:
        raise FlashdutyError("invalid-case", "duty", "duty: missing (give the heat into the stream)")
    return _run("duty", data, {}, library)


def curve(case=None, /, *, library=None, **keys):
    """A heating or cooling curve."""
    return _run("curve", case, keys, library)


def azeotropes(case=None, /, *, library=None, **keys):
    """The azeotropes of a binary at T or P, under the case's ``liquid_model``."""
    return _run("azeotropes", case, keys, library)


def _rows(name, a, n=None):
    a = np.ascontiguousarray(a, dtype=np.float64)
    if a.ndim != 2 or (n is not None and a.shape[1] != n):
        raise FlashdutyError("length-mismatch", name, f"{name}: expected a 2-D array (N, n), got shape {a.shape}")
    return a


def _column(name, a, rows):
    a = np.ascontiguousarray(np.broadcast_to(np.asarray(a, dtype=np.float64), (rows,)))
    return a


def flash_batch(components, z, T, P, library=None):
    """T-P flashes of ``components`` with feeds ``z`` (N, n) at ``T`` (K) and ``P`` (Pa),
    arrays of N or scalars. Returns a dict of arrays: ``phase`` (codes, see PHASES),
    ``vapour_fraction``, ``liquid_fraction``, ``x`` and ``y`` (N, n)."""
    z = _rows("z", z)
    rows = z.shape[0]
    return _native(
        _flashduty.flash_batch, list(components), z, _column("T", T, rows), _column("P", P, rows), library
    )


def rachford_rice_batch(z, K):
    """The Rachford-Rice split of feeds ``z`` (N, n) with given K-values ``K`` (N, n)."""
    z = _rows("z", z)
    return _native(_flashduty.rachford_rice_batch, z, _rows("K", K))


def duty_batch(components, z, flow_mol_s, T_in, P_in, T_out, P_out, library=None, water_phase=None):
    """Heater duties (W) of one stream between inlet and outlet states given by arrays (or
    scalars) of temperature (K) and pressure (Pa). ``water_phase="immiscible"`` adds the
    immiscible water phase."""
    cols = [np.asarray(v, dtype=np.float64) for v in (T_in, P_in, T_out, P_out)]
    rows = max(c.size for c in cols)
    cols = [_column(name, c, rows) for name, c in zip(("T_in", "P_in", "T_out", "P_out"), cols)]
    if water_phase not in (None, "one-liquid", "immiscible"):
        raise FlashdutyError(
            "invalid-case", "water_phase", f"water_phase: {water_phase!r} is not one of one-liquid, immiscible"
        )
    return _native(
        _flashduty.duty_batch,
        list(components),
        [float(v) for v in z],
        float(flow_mol_s),
        *cols,
        library=library,
        immiscible_water=water_phase == "immiscible",
    )
