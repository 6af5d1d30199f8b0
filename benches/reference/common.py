"""Shared reading of pathway files for the reference scripts."""
import re

R = 8.314462618e-3  # kJ/(mol K), exact in the 2019 SI
CONC = {"M": 1.0, "mM": 1e-3, "uM": 1e-6, "µM": 1e-6, "nM": 1e-9, "pM": 1e-12}
ENERGY = {"kJ/mol": 1.0, "kcal/mol": 4.184, "J/mol": 1e-3}
ARROW = re.compile(r"\s*(?:<=>|<->|->|=>|→|⇌|=)\s*")


def quantity(v, table, default):
    """A number with an optional unit, in the table's base unit."""
    if not isinstance(v, str):
        return float(v) * table[default]
    m = re.match(r"\s*([-+0-9.eE]+)\s*(.*?)\s*$", v)
    return float(m.group(1)) * table[m.group(2) or default]


def temperature(v):
    """A temperature with its unit, in K."""
    m = re.match(r"\s*([-+0-9.eE]+)\s*(.*?)\s*$", v)
    x = float(m.group(1))
    return x + 273.15 if m.group(2) in ("C", "°C") else x


def terms(reaction):
    """(coefficient, id) pairs of a reaction, substrates negative."""
    left, right = ARROW.split(reaction)
    out = []
    for sign, side in ((-1.0, left), (1.0, right)):
        for term in side.split(" + "):
            parts = term.split()
            coef, cid = (float(parts[0]), parts[1]) if len(parts) == 2 else (1.0, parts[0])
            out.append((sign * coef, cid))
    return out
