"""Inch and Fahrenheit: alternative case-file keys and US-unit output, converted by pint.

Inside, quenchwise works in SI (mm, C) only. A case file may give a length in inches or a
temperature in Fahrenheit under the key named with that unit (``diameter_in`` beside
``diameter_mm``, ``austenitize_f`` beside ``austenitize_c``); it is converted to the SI key before
validation. Output is SI unless ``--units us`` asks for inches and Fahrenheit; files are then
written with unit-named columns (``depth_in``) so a reader always sees the unit.
"""

from __future__ import annotations

from functools import lru_cache

from .errors import InputError

#: Alternative keys per table: US key -> (SI key, pint unit of the US key, pint unit of the SI key).
US_KEYS = {
    "steel": {"austenitize_f": ("austenitize_c", "degF", "degC")},
    "part": {"thickness_in": ("thickness_mm", "inch", "mm"), "diameter_in": ("diameter_mm", "inch", "mm"),
             "outer_diameter_in": ("outer_diameter_mm", "inch", "mm"),
             "inner_diameter_in": ("inner_diameter_mm", "inch", "mm"),
             "length_in": ("length_mm", "inch", "mm")},
    "quench": {"bath_f": ("bath_c", "degF", "degC"), "end_f": ("end_c", "degF", "degC"),
               "inner_bath_f": ("inner_bath_c", "degF", "degC")},
    "temper": {"temperature_f": ("temperature_c", "degF", "degC")},
    "requirement": {"depth_in": ("depth_mm", "inch", "mm")},
}
SYSTEMS = ("si", "us")


@lru_cache(maxsize=1)
def _registry():
    import pint

    return pint.UnitRegistry()


def convert(value: float, src: str, dst: str) -> float:
    """value in pint unit src, expressed in dst (offset units such as degF handled by pint).

    >>> round(convert(1.0, "inch", "mm"), 6), round(convert(1562.0, "degF", "degC"), 6)
    (25.4, 850.0)
    """
    ureg = _registry()
    return float(ureg.Quantity(float(value), src).to(dst).magnitude)


def si_keys(data: dict) -> dict:
    """A copy of a parsed case file with every US key replaced by its SI key (value converted).

    Giving both (``diameter_in`` and ``diameter_mm``) is an error; a US value that is not a number
    is left for the SI key's own validation to report.

    >>> si_keys({"part": {"shape": "bar", "diameter_in": 2.0}})["part"]["diameter_mm"]
    50.8
    """
    out = dict(data)
    for table, aliases in US_KEYS.items():
        t = data.get(table)
        if not isinstance(t, dict) or not any(k in t for k in aliases):
            continue
        t = dict(t)
        for us, (si, u_src, u_dst) in aliases.items():
            if us not in t:
                continue
            if si in t:
                raise InputError(f"{table}.{us}", t[us], f"either {us} or {si}, not both")
            v = t.pop(us)
            ok = isinstance(v, (int, float)) and not isinstance(v, bool)
            t[si] = round(convert(v, u_src, u_dst), 9) if ok else v
        out[table] = t
    return out


def us_origins(data: dict) -> dict:
    """{"part.diameter_mm": ("part.diameter_in", 1.0), ...} for every US key present, so an error
    found on the converted SI key can name the key and value the user wrote."""
    out = {}
    for table, aliases in US_KEYS.items():
        t = data.get(table)
        if isinstance(t, dict):
            for us, (si, _, _) in aliases.items():
                if us in t:
                    out[f"{table}.{si}"] = (f"{table}.{us}", t[us])
    return out


def renamed_error(exc: InputError, origins: dict) -> InputError:
    """The same error on the US key the user gave, with the SI value it was converted to.

    >>> str(renamed_error(InputError("part.diameter_mm", -25.4, "a number from 0.5 to 2000"),
    ...                   {"part.diameter_mm": ("part.diameter_in", -1.0)}))
    'part.diameter_in = -1.0: allowed is a number from 0.5 to 2000 (after conversion: part.diameter_mm = -25.4)'
    """
    if exc.key not in origins:
        return exc
    key, value = origins[exc.key]
    return InputError(key, value, f"{exc.allowed} (after conversion: {exc.key} = {exc.value!r})", source=exc.source)


class Units:
    """How lengths and temperatures are shown: "si" (mm, C) or "us" (in, F).

    >>> u = Units("us"); (round(u.length(25.4), 6), u.length_unit, round(u.temperature(100.0), 6), u.temp_unit)
    (1.0, 'in', 212.0, '°F')
    """

    def __init__(self, system: str = "si"):
        if system not in SYSTEMS:
            raise InputError("--units", system, "si or us")
        self.system = system
        self.us = system == "us"
        self.length_unit = "in" if self.us else "mm"
        self.temp_unit = "°F" if self.us else "°C"
        self.temp_ascii = "F" if self.us else "C"

    def length(self, mm):
        return None if mm is None else (convert(mm, "mm", "inch") if self.us else float(mm))

    def temperature(self, c):
        return None if c is None else (convert(c, "degC", "degF") if self.us else float(c))

    def rate(self, k_per_s):
        """A cooling rate [K/s] in K/s or F/s (a temperature difference: no offset)."""
        return None if k_per_s is None else (convert(k_per_s, "delta_degC", "delta_degF") if self.us else float(k_per_s))

    def fmt_length(self, mm, digits: int | None = None) -> str:
        v = self.length(mm)
        d = (3 if self.us else 2) if digits is None else digits
        return f"{v:.{d}f} {self.length_unit}"

    def fmt_temperature(self, c) -> str:
        return f"{self.temperature(c):.0f} {self.temp_ascii}"


def us_csv_text(text: str) -> str:
    """A CSV written in SI with unit-named columns (``*_mm``, ``*_c``, ``*_c_s``), rewritten in inches
    and Fahrenheit with the columns renamed (``*_in``, ``*_f``, ``*_f_s``); other columns unchanged.

    >>> print(us_csv_text("depth_mm,hv,cooling_rate_700_c_s\\n25.4,500,10\\n"), end="")
    depth_in,hv,cooling_rate_700_c_f_s
    1.0000,500,18.0000
    """
    import csv
    import io

    rows = list(csv.reader(io.StringIO(text)))
    if not rows:
        return text
    header, plan = [], []
    for name in rows[0]:
        if name.endswith("_mm"):
            header.append(name[:-3] + "_in")
            plan.append(("mm", "inch"))
        elif name.endswith("_c_s"):
            # A rate: the temperature difference converts (x1.8); the label keeps the SI reading point.
            header.append(name[:-2] + "_f_s")
            plan.append(("delta_degC", "delta_degF"))
        elif name.endswith("_c"):
            header.append(name[:-2] + "_f")
            plan.append(("degC", "degF"))
        else:
            header.append(name)
            plan.append(None)
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    w.writerow(header)
    for row in rows[1:]:
        w.writerow([v if p is None or v == "" else f"{convert(float(v), *p):.4f}" for v, p in zip(row, plan)])
    return out.getvalue()
