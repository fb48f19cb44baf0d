#!/usr/bin/python3
"""Independent nodal calculation that checks `overtone study --json`.

Usage: nodal_reference.py OVERTONE_BINARY PLANT.yaml [--show N] [--keep-json FILE]

Written from the plant-format page (docs: PLANT-FORMAT.md, format 1) and textbook circuit theory,
not from the tool's C++ sources. It

  1. reads the plant file itself (format 1, with `extends`/`remove`, its own unit parser),
  2. builds a dense per-phase admittance matrix in SI units (volts line-to-neutral, amperes,
     siemens) for the fundamental and for every order h = 2..max_order,
  3. solves the fundamental load flow (constant-power motors, loads and drives) by Newton-Raphson,
  4. places the table spectra of `measured`/`active` drives and the supplies' background voltages,
  5. solves V(h) = Y(h)^-1 I(h) with numpy and derives bus THD, branch currents and drive currents,
  6. runs `OVERTONE_BINARY study PLANT --json TMP` and compares every bus, branch and drive.

Exit status: 0 when everything agrees, 1 when something does not (worst mismatches listed),
2 when the reference cannot run (bad plant for this checker, tool failed).

Drives whose spectrum is not a table in the plant file (the built-in bridge front ends, and an
`active` front end without `harmonics`) cannot be computed independently here. For those the
checker takes the tool's own numbers from the JSON `drives` entry and checks only the network
around them:
  * built-in bridge (diode-capacitor, diode-choke, thyristor, single-phase, multipulse): the drawn
    fundamental current (i1_a, i1_angle_deg) is a fixed current sink in the load flow and every
    harmonic (amps, angle_deg) a fixed current source; these drives' own currents are then not
    compared (reported as "taken from the tool").
  * `active` without a table: P and Q are independent (P = count*power*loading, Q from
    displacement_pf), the load flow is independent; the spectrum is read from the JSON as percent
    and angle relative to the tool's i1 angle (angle_deg - h*i1_angle_deg), then placed again at
    this checker's own theta_I1 by the Conventions rule. The drive's i1 is compared; its harmonic
    percents are not (they are the tool's), its harmonic angles and amps are.
"""

import math
import os
import re
import subprocess
import sys
import tempfile

try:
    import numpy as np
    import yaml
except ImportError:  # an interpreter without Debian's python3-numpy / python3-yaml (e.g. pyenv)
    if os.path.exists("/usr/bin/python3") and os.path.realpath(sys.executable) != \
            os.path.realpath("/usr/bin/python3"):
        os.execv("/usr/bin/python3", ["/usr/bin/python3"] + sys.argv)
    raise

SQRT3 = math.sqrt(3.0)
DEG = math.pi / 180.0

# --------------------------------------------------------------------------------------------
# Quantities (PLANT-FORMAT.md "Quantities"): a string with a unit, or a bare number in the key's
# own unit. Values are converted to SI; percent and pu become plain fractions.
# --------------------------------------------------------------------------------------------

# unit text -> (dimension, factor to SI)
UNITS = {
    "V": ("voltage", 1.0), "kV": ("voltage", 1e3),
    "VA": ("apparent", 1.0), "kVA": ("apparent", 1e3), "MVA": ("apparent", 1e6),
    "var": ("reactive", 1.0), "kvar": ("reactive", 1e3), "kVAr": ("reactive", 1e3),
    "kVAR": ("reactive", 1e3), "Mvar": ("reactive", 1e6), "MVAr": ("reactive", 1e6),
    "MVAR": ("reactive", 1e6),
    "W": ("active", 1.0), "kW": ("active", 1e3), "MW": ("active", 1e6),
    "%": ("fraction", 0.01), "pu": ("pu", 1.0),
    "m": ("length", 1.0), "km": ("length", 1e3),
    "ohm/km": ("ohm_per_m", 1e-3), "ohm/m": ("ohm_per_m", 1.0),
    "uF/km": ("farad_per_m", 1e-9), "nF/km": ("farad_per_m", 1e-12),
    "H": ("inductance", 1.0), "mH": ("inductance", 1e-3), "uH": ("inductance", 1e-6),
    "F": ("capacitance", 1.0), "mF": ("capacitance", 1e-3), "uF": ("capacitance", 1e-6),
    "deg": ("angle", 1.0), "Hz": ("frequency", 1.0), "A": ("current", 1.0),
    "kA": ("current", 1e3),
}

NUMBER_RE = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S*)\s*$")


class PlantError(Exception):
    pass


def quantity(text, allowed, bare, what):
    """Parse `text` (a YAML scalar, always a string here) into SI.

    allowed: dimensions accepted; bare: (dimension, factor) for a bare number."""
    m = NUMBER_RE.match(str(text))
    if not m:
        raise PlantError(f"{what}: not a quantity: {text!r}")
    value = float(m.group(1))
    unit = m.group(2)
    if unit == "":
        return value * bare[1]
    if unit not in UNITS:
        raise PlantError(f"{what}: unknown unit {unit!r}")
    dim, factor = UNITS[unit]
    if dim not in allowed:
        raise PlantError(f"{what}: unit {unit!r} does not fit")
    return value * factor


def q_kv(t, w):
    return quantity(t, {"voltage"}, ("voltage", 1e3), w)


def q_pu(t, w):  # voltage, locked_rotor_reactance, x2: bare pu
    return quantity(t, {"pu", "fraction"}, ("pu", 1.0), w)


def q_pct(t, w):  # impedance, tap, loading, detuning, percent: bare %
    return quantity(t, {"fraction", "pu"}, ("fraction", 0.01), w)


def q_frac(t, w):  # efficiency, power_factor, displacement_pf: a fraction or a percent
    return quantity(t, {"fraction"}, ("fraction", 1.0), w)


def q_angle(t, w):
    return quantity(t, {"angle"}, ("angle", 1.0), w)


def q_plain(t, w):
    m = NUMBER_RE.match(str(t))
    if not m or m.group(2):
        raise PlantError(f"{w}: plain number expected, got {t!r}")
    return float(m.group(1))


def q_int(t, w):
    v = q_plain(t, w)
    if v != int(v):
        raise PlantError(f"{w}: whole number expected, got {t!r}")
    return int(v)


# --------------------------------------------------------------------------------------------
# Reading the plant file (PLANT-FORMAT.md "Top level", "extends").
# --------------------------------------------------------------------------------------------

CATEGORIES = ["supplies", "generators", "buses", "transformers", "cables", "capacitors",
              "filters", "motors", "loads", "drives"]


def load_raw(path, depth=0):
    """Raw merged document: {'study': {...}, category: [dict, ...]} with every scalar a string.

    yaml.BaseLoader keeps every scalar as its source text, so `ON` stays the name "ON"
    (PLANT-FORMAT.md "Quantities": names are strings)."""
    if depth > 20:
        raise PlantError("extends nests too deep")
    with open(path, encoding="utf-8") as f:
        doc = yaml.load(f, Loader=yaml.BaseLoader) or {}
    if str(doc.get("overtone", "")) != "1":
        raise PlantError(f"{path}: `overtone: 1` required")
    if "extends" in doc:
        base = load_raw(os.path.join(os.path.dirname(path), doc["extends"]), depth + 1)
    else:
        base = {"study": {}}
        for c in CATEGORIES:
            base[c] = []
    removed = set(doc.get("remove", []) or [])
    for c in CATEGORIES:
        base[c] = [e for e in base[c] if e["name"] not in removed]
    base["study"] = dict(base["study"])
    base["study"].update(doc.get("study", {}) or {})  # study merges key by key
    for c in CATEGORIES:
        for e in doc.get(c, []) or []:
            names = [x["name"] for x in base[c]]
            if e["name"] in names:  # an element with an inherited name replaces it in place
                base[c][names.index(e["name"])] = e
            else:
                base[c].append(e)
    base["_file"] = path
    return base


VG_RE = re.compile(r"^(YN|Y|D|ZN|Z)(yn|y|d|zn|z)(\d{1,2})$")


def build_plant(raw):
    """Typed plant with the format page's defaults, SI units."""
    st = raw["study"]
    P = {"study": {
        "frequency": quantity(st.get("frequency", "60"), {"frequency"}, ("frequency", 1.0),
                              "study.frequency"),
        "max_order": q_int(st.get("max_order", "50"), "study.max_order"),
    }}
    buses = {}
    for b in raw["buses"]:
        buses[b["name"]] = q_kv(b["kv"], f"bus {b['name']}.kv")
    P["buses"] = buses

    def bus_of(e, key="bus"):
        if e[key] not in buses:
            raise PlantError(f"{e['name']}: unknown bus {e[key]}")
        return e[key]

    P["supplies"] = []
    for s in raw["supplies"]:
        n = s["name"]
        bg = []
        for row in s.get("background", []) or []:
            bg.append((q_int(row["order"], f"{n}.background.order"),
                       q_pct(row["percent"], f"{n}.background.percent"),
                       q_angle(row.get("angle", "0"), f"{n}.background.angle")))
        P["supplies"].append({
            "name": n, "bus": bus_of(s),
            "ssc": quantity(s["short_circuit"], {"apparent"}, ("apparent", 1e6),
                            f"{n}.short_circuit"),
            "xr": q_plain(s.get("x_over_r", "10"), f"{n}.x_over_r"),
            "v": q_pu(s.get("voltage", "1.0"), f"{n}.voltage"),
            "angle": q_angle(s.get("angle", "0"), f"{n}.angle"),
            "background": bg})
    P["generators"] = []
    for g in raw["generators"]:
        n = g["name"]
        P["generators"].append({
            "name": n, "bus": bus_of(g),
            "rating": quantity(g["rating"], {"apparent"}, ("apparent", 1e3), f"{n}.rating"),
            "x2": q_pu(g.get("x2", "0.15"), f"{n}.x2"),
            "xr": q_plain(g.get("x_over_r", "15"), f"{n}.x_over_r"),
            "v": q_pu(g.get("voltage", "1.0"), f"{n}.voltage"),
            "angle": q_angle(g.get("angle", "0"), f"{n}.angle")})
    P["transformers"] = []
    for t in raw["transformers"]:
        n = t["name"]
        m = VG_RE.match(t["connection"])
        if not m:
            raise PlantError(f"{n}: connection {t['connection']!r} not understood")
        P["transformers"].append({
            "name": n, "from": bus_of(t, "from"), "to": bus_of(t, "to"),
            "rating": quantity(t["rating"], {"apparent"}, ("apparent", 1e3), f"{n}.rating"),
            "z": q_pct(t["impedance"], f"{n}.impedance"),
            "xr": q_plain(t.get("x_over_r", "8"), f"{n}.x_over_r"),
            "clock": int(m.group(3)) % 12,
            "yn_yn": m.group(1) == "YN" and m.group(2) == "yn",
            "tap": q_pct(t.get("tap", "0"), f"{n}.tap")})
    P["cables"] = []
    for c in raw["cables"]:
        n = c["name"]
        P["cables"].append({
            "name": n, "from": bus_of(c, "from"), "to": bus_of(c, "to"),
            "length": quantity(c["length"], {"length"}, ("length", 1.0), f"{n}.length"),
            "r": quantity(c["r"], {"ohm_per_m"}, ("ohm_per_m", 1e-3), f"{n}.r"),
            "x": quantity(c["x"], {"ohm_per_m"}, ("ohm_per_m", 1e-3), f"{n}.x"),
            "c": quantity(c.get("c", "0"), {"farad_per_m"}, ("farad_per_m", 1e-9), f"{n}.c"),
            "runs": q_int(c.get("runs", "1"), f"{n}.runs")})
    P["capacitors"] = []
    for c in raw["capacitors"]:
        n = c["name"]
        steps = q_int(c.get("steps", "1"), f"{n}.steps")
        p = 0.0
        if "detuning" in c:
            p = q_pct(c["detuning"], f"{n}.detuning")
        elif "tuned_order" in c:
            p = 1.0 / q_plain(c["tuned_order"], f"{n}.tuned_order") ** 2
        P["capacitors"].append({
            "name": n, "bus": bus_of(c),
            "rating": quantity(c["rating"], {"reactive"}, ("reactive", 1e3), f"{n}.rating"),
            "kv": q_kv(c["kv"], f"{n}.kv") if "kv" in c else buses[c["bus"]],
            "steps": steps, "steps_on": q_int(c.get("steps_on", str(steps)), f"{n}.steps_on"),
            "p": p, "xr": q_plain(c.get("x_over_r", "50"), f"{n}.x_over_r")})
    P["filters"] = []
    for f in raw["filters"]:
        n = f["name"]
        typ = f.get("type", "single-tuned")
        P["filters"].append({
            "name": n, "bus": bus_of(f), "type": typ,
            "rating": quantity(f["rating"], {"reactive"}, ("reactive", 1e3), f"{n}.rating"),
            "kv": q_kv(f["kv"], f"{n}.kv") if "kv" in f else buses[f["bus"]],
            "n": q_plain(f["tuned_order"], f"{n}.tuned_order"),
            "quality": q_plain(f.get("quality", "40" if typ == "single-tuned" else "1.0"),
                               f"{n}.quality")})
    P["motors"] = []
    for m_ in raw["motors"]:
        n = m_["name"]
        rt = str(m_["rating"])
        mm = NUMBER_RE.match(rt)
        is_kva = bool(mm) and mm.group(2) in UNITS and UNITS[mm.group(2)][0] == "apparent"
        P["motors"].append({
            "name": n, "bus": bus_of(m_),
            "rating": quantity(rt, {"active", "apparent"}, ("active", 1e3), f"{n}.rating"),
            "is_kva": is_kva,
            "kv": q_kv(m_["kv"], f"{n}.kv") if "kv" in m_ else buses[m_["bus"]],
            "count": q_int(m_.get("count", "1"), f"{n}.count"),
            "loading": q_pct(m_.get("loading", "100"), f"{n}.loading"),
            "xlr": q_pu(m_.get("locked_rotor_reactance", "0.17"), f"{n}.locked_rotor_reactance"),
            "xr": q_plain(m_.get("x_over_r", "10"), f"{n}.x_over_r"),
            "eff": q_frac(m_.get("efficiency", "0.95"), f"{n}.efficiency"),
            "pf": q_frac(m_.get("power_factor", "0.88"), f"{n}.power_factor")})
    P["loads"] = []
    for ld in raw["loads"]:
        n = ld["name"]
        P["loads"].append({
            "name": n, "bus": bus_of(ld),
            "p": quantity(ld["p"], {"active"}, ("active", 1e3), f"{n}.p"),
            "q": quantity(ld.get("q", "0"), {"reactive"}, ("reactive", 1e3), f"{n}.q"),
            "count": q_int(ld.get("count", "1"), f"{n}.count"),
            "model": ld.get("model", "parallel-rl")})
    P["drives"] = []
    for d in raw["drives"]:
        n = d["name"]
        table = []
        for row in d.get("harmonics", []) or []:
            table.append((q_int(row["order"], f"{n}.harmonics.order"),
                          q_pct(row["percent"], f"{n}.harmonics.percent"),
                          q_angle(row.get("angle", "0"), f"{n}.harmonics.angle")))
        P["drives"].append({
            "name": n, "bus": bus_of(d),
            "count": q_int(d.get("count", "1"), f"{n}.count"),
            "power": quantity(d["power"], {"active"}, ("active", 1e3), f"{n}.power"),
            "loading": q_pct(d.get("loading", "100"), f"{n}.loading"),
            "front_end": d.get("front_end", "diode-capacitor"),
            "table": table,
            "dpf": q_frac(d.get("displacement_pf", "1.0"), f"{n}.displacement_pf")})
    return P


# --------------------------------------------------------------------------------------------
# Element models, per phase, SI. Every impedance is Z(h) at order h.
# --------------------------------------------------------------------------------------------

def supply_impedance(s, vnom, h):
    # Thevenin source: |Z1| = V_LL^2 / S_sc, split by X/R; R constant, X proportional to h.
    # (PLANT-FORMAT.md "supplies"; IEEE 519-2014 / IEEE 399 short-circuit model, from memory:
    # per-phase Z = (V_LL/sqrt3)^2 / (S_3ph/3) = V_LL^2/S_3ph.)
    z = vnom ** 2 / s["ssc"]
    r = z / math.sqrt(1.0 + s["xr"] ** 2)
    return complex(r, h * r * s["xr"])


def generator_impedance(g, vnom, h):
    # EMF behind R + jhX2, X2 = x2 * V^2/S_rating, R = X2/x_over_r (PLANT-FORMAT.md "generators").
    # The same R + jX2 is taken at the fundamental ("an EMF behind its reactance").
    x2 = g["x2"] * vnom ** 2 / g["rating"]
    return complex(x2 / g["xr"], h * x2)


def transformer_series(t, vfrom, h):
    # %Z on the rating at the from-bus voltage, split by X/R; R constant, X proportional to h
    # (PLANT-FORMAT.md "transformers"; IEEE C57.12.90 impedance-voltage definition, from memory).
    z = t["z"] * vfrom ** 2 / t["rating"]
    r = z / math.sqrt(1.0 + t["xr"] ** 2)
    return complex(r, h * r * t["xr"])


def transformer_ratio(t, vfrom, vto, h):
    """Complex ratio t = a*e^{j phi}: V_to(open circuit) = V_from / t.

    a = (V_from/V_to)*(1 + tap): +tap = more turns on the from winding, to-side open-circuit
    voltage falls by 1/(1+tap) (PLANT-FORMAT.md Conventions). phi = +30 deg*clock for positive
    sequence (to side lags), -30 deg*clock for negative sequence (IEC 60076-1 clock notation,
    sequence rule as in the format page; the negative-sequence sign reversal is textbook
    symmetrical components, e.g. Grainger & Stevenson, "Power System Analysis", section on phase
    shift in Y-D transformers, from memory). Zero sequence: YNyn only, no shift for clock 0
    (common practice; unused in format 1, where no order 3k has a source).
    Returns None where the order has no path through this transformer."""
    a = vfrom / vto * (1.0 + t["tap"])
    seq = h % 3
    if seq == 1:
        phi = 30.0 * t["clock"]
    elif seq == 2:
        phi = -30.0 * t["clock"]
    else:
        if not t["yn_yn"]:
            return None
        phi = 180.0 if t["clock"] == 6 else 0.0
    return a * complex(math.cos(phi * DEG), math.sin(phi * DEG))


def capacitor_admittance(c, h):
    # X_C of one step from its kvar at rated kV: X_C = V^2/Q_step (IEEE Std 18 rating at rated
    # voltage, from memory). Detuning reactor: X_L = p*X_C at the fundamental, R = X_L/x_over_r
    # (PLANT-FORMAT.md "capacitors"); without reactor lossless. Steps in service in parallel.
    if c["steps_on"] == 0:
        return 0j
    xc = c["kv"] ** 2 / (c["rating"] / c["steps"])
    if c["p"] > 0.0:
        xl = c["p"] * xc
        z = complex(xl / c["xr"], h * xl - xc / h)
        return c["steps_on"] / z
    return c["steps_on"] * complex(0.0, h / xc)


def filter_admittance(f, h):
    # X_C from the capacitor rating at rated kV; X_L = X_C/n^2 (tuned where hX_L = X_C/h);
    # X0 = sqrt(L/C) = sqrt(X_L*X_C) (characteristic reactance; Arrillaga & Watson, "Power
    # System Harmonics", ch. on filters, from memory; definitions as in PLANT-FORMAT.md).
    xc = f["kv"] ** 2 / f["rating"]
    xl = xc / f["n"] ** 2
    x0 = math.sqrt(xl * xc)
    if f["type"] == "single-tuned":
        r = x0 / f["quality"]  # quality = X0/R
        z = complex(r, h * xl - xc / h)
    elif f["type"] == "high-pass":
        r = f["quality"] * x0  # quality = R/X0
        zl = complex(0.0, h * xl)
        z = complex(0.0, -xc / h) + r * zl / (r + zl)
    else:
        raise PlantError(f"{f['name']}: unknown filter type {f['type']}")
    return 1.0 / z


def motor_power(m):
    # Fundamental: constant power. kW rating: P = rating*loading/efficiency; kVA rating:
    # P = S*pf*loading; Q = P*tan(acos pf); count units (PLANT-FORMAT.md "motors").
    if m["is_kva"]:
        p = m["rating"] * m["pf"] * m["loading"]
    else:
        p = m["rating"] * m["loading"] / m["eff"]
    q = p * math.tan(math.acos(m["pf"]))
    return m["count"] * complex(p, q)


def motor_admittance(m, h):
    # R + jh*X_lr on the motor's kVA base, R = X_lr/x_over_r, count in parallel (PLANT-FORMAT.md
    # "motors"; locked-rotor (subtransient) reactance model: IEEE 519-2014 / IEEE 399, from memory).
    s = m["rating"] if m["is_kva"] else m["rating"] / (m["eff"] * m["pf"])
    x = m["xlr"] * m["kv"] ** 2 / s
    return m["count"] / complex(x / m["xr"], h * x)


def load_power(ld):
    return ld["count"] * complex(ld["p"], ld["q"])


def load_admittance(ld, vnom, h):
    # parallel-rl: R = V^2/P || jhV^2/Q; series-rl: Z = V^2/(P - jQ) with X scaled by h; none
    # (PLANT-FORMAT.md "loads"; the parallel R-L aggregate load model is common practice, e.g.
    # CIGRE/CIRED WG CC02 "Guide for assessing the network harmonic impedance", from memory).
    s = load_power(ld)
    p, q = s.real, s.imag
    v2 = vnom ** 2
    if ld["model"] == "parallel-rl":
        y = 0j
        if p > 0:
            y += 1.0 / v2 * p
        if q > 0:
            y += 1.0 / complex(0.0, h * v2 / q)
        return y
    if ld["model"] == "series-rl":
        z1 = v2 / complex(p, -q)
        return 1.0 / complex(z1.real, h * z1.imag)
    if ld["model"] == "none":
        return 0j
    raise PlantError(f"{ld['name']}: unknown load model {ld['model']}")


def drive_power(d):
    # measured/active: P = count*power*loading, Q from displacement_pf, lagging (drawn).
    p = d["count"] * d["power"] * d["loading"]
    return complex(p, p * math.tan(math.acos(d["dpf"])))


BRIDGE_FRONT_ENDS = {"diode-capacitor", "diode-choke", "thyristor", "single-phase", "multipulse"}


# --------------------------------------------------------------------------------------------
# The calculation.
# --------------------------------------------------------------------------------------------

class Reference:
    def __init__(self, plant, tool_json):
        self.P = plant
        self.names = list(plant["buses"])
        self.idx = {n: i for i, n in enumerate(self.names)}
        self.nb = len(self.names)
        self.w = 2.0 * math.pi * plant["study"]["frequency"]
        self.H = plant["study"]["max_order"]
        self.notes = []
        self.tool_drives = {d["name"]: d for d in tool_json.get("drives", [])}
        # how each drive is handled
        self.mode = {}
        for d in plant["drives"]:
            if d["front_end"] == "measured" or (d["front_end"] == "active" and d["table"]):
                self.mode[d["name"]] = "table"
            elif d["front_end"] == "active":
                self.mode[d["name"]] = "active-json"
                self.notes.append(f"drive {d['name']}: active without table, spectrum read from "
                                  "the tool's JSON (percent, angle relative to its i1)")
            elif d["front_end"] in BRIDGE_FRONT_ENDS:
                self.mode[d["name"]] = "bridge-json"
                self.notes.append(f"drive {d['name']}: {d['front_end']} bridge, currents taken "
                                  "from the tool's JSON (only the network is checked)")
            else:
                raise PlantError(f"{d['name']}: unknown front_end {d['front_end']}")
            if self.mode[d["name"]] != "table" and d["name"] not in self.tool_drives:
                raise PlantError(f"drive {d['name']} missing from the tool's JSON")

    def vnom(self, bus):
        return self.P["buses"][bus]

    # Y(h) with the network elements; at h = 1 only the fundamental network (no motor/load
    # impedances: those are constant power). Returns Y and the supplies' Norton currents at h
    # (EMF at h = 1, background at h >= 2).
    def assemble(self, h):
        Y = np.zeros((self.nb, self.nb), dtype=complex)
        I = np.zeros(self.nb, dtype=complex)
        for s in self.P["supplies"]:
            i = self.idx[s["bus"]]
            vn = self.vnom(s["bus"])
            z = supply_impedance(s, vn, h)
            Y[i, i] += 1.0 / z
            e1 = s["v"] * vn / SQRT3
            if h == 1:
                I[i] += e1 * np.exp(1j * s["angle"] * DEG) / z
            elif h % 3 != 0:  # triplen background ignored (format 1)
                for (order, pct, ang) in s["background"]:
                    if order == h:  # order h sits at angle(table) + h*(supply angle)
                        I[i] += pct * e1 * np.exp(1j * (ang + h * s["angle"]) * DEG) / z
        for g in self.P["generators"]:
            i = self.idx[g["bus"]]
            vn = self.vnom(g["bus"])
            z = generator_impedance(g, vn, h)
            Y[i, i] += 1.0 / z
            if h == 1:
                I[i] += g["v"] * vn / SQRT3 * np.exp(1j * g["angle"] * DEG) / z
        for t in self.P["transformers"]:
            i, k = self.idx[t["from"]], self.idx[t["to"]]
            tr = transformer_ratio(t, self.vnom(t["from"]), self.vnom(t["to"]), h)
            if tr is None:
                continue
            y = 1.0 / transformer_series(t, self.vnom(t["from"]), h)
            # from --y-- ideal (tr:1) -- to; power-invariant ideal transformer:
            # I_from = y (V_f - tr V_t), I into to side = conj(tr) I_from (textbook two-port,
            # e.g. Grainger & Stevenson, phase-shifting transformer model, from memory).
            Y[i, i] += y
            Y[i, k] += -y * tr
            Y[k, i] += -y * np.conj(tr)
            Y[k, k] += y * abs(tr) ** 2
        for c in self.P["cables"]:
            i, k = self.idx[c["from"]], self.idx[c["to"]]
            z, ysh = self.cable_zy(c, h)
            Y[i, i] += 1.0 / z + ysh
            Y[k, k] += 1.0 / z + ysh
            Y[i, k] -= 1.0 / z
            Y[k, i] -= 1.0 / z
        for c in self.P["capacitors"]:
            i = self.idx[c["bus"]]
            Y[i, i] += capacitor_admittance(c, h)
        for f in self.P["filters"]:
            i = self.idx[f["bus"]]
            Y[i, i] += filter_admittance(f, h)
        if h >= 2:
            for m in self.P["motors"]:
                Y[self.idx[m["bus"]], self.idx[m["bus"]]] += motor_admittance(m, h)
            for ld in self.P["loads"]:
                i = self.idx[ld["bus"]]
                Y[i, i] += load_admittance(ld, self.vnom(ld["bus"]), h)
        return Y, I

    def cable_zy(self, c, h):
        # Nominal pi: series (r + jh x) * length / runs, half the shunt j h w c length runs at each
        # end (Grainger & Stevenson, medium-line nominal-pi model, from memory).
        z = complex(c["r"], h * c["x"]) * c["length"] / c["runs"]
        ysh = 1j * h * self.w * c["c"] * c["length"] * c["runs"] / 2.0
        return z, ysh

    # -- fundamental ---------------------------------------------------------------------------
    def load_flow(self):
        Y, Isrc = self.assemble(1)
        S = np.zeros(self.nb, dtype=complex)   # three-phase constant power drawn at each bus
        Ifix = np.zeros(self.nb, dtype=complex)  # fixed drawn currents (bridge drives from JSON)
        for m in self.P["motors"]:
            S[self.idx[m["bus"]]] += motor_power(m)
        for ld in self.P["loads"]:
            S[self.idx[ld["bus"]]] += load_power(ld)
        for d in self.P["drives"]:
            if self.mode[d["name"]] == "bridge-json":
                td = self.tool_drives[d["name"]]
                Ifix[self.idx[d["bus"]]] += td["i1_a"] * np.exp(1j * td["i1_angle_deg"] * DEG)
            else:
                S[self.idx[d["bus"]]] += drive_power(d)
        s = S / 3.0  # per phase
        b = Isrc - Ifix
        V = np.linalg.solve(Y, b)  # no-load start: right angles through the vector groups
        n = self.nb
        for it in range(100):
            F = Y @ V - b + np.conj(s / V)
            # Newton-Raphson on F(V) = Y V - b + conj(s)/conj(V) in rectangular form; dF/dV = Y,
            # dF/dconj(V) = -conj(s)/conj(V)^2 (Wirtinger calculus).
            D = np.diag(-np.conj(s) / np.conj(V) ** 2)
            A = Y + D
            B = 1j * (Y - D)
            J = np.block([[A.real, B.real], [A.imag, B.imag]])
            dx = np.linalg.solve(J, -np.concatenate([F.real, F.imag]))
            dV = dx[:n] + 1j * dx[n:]
            V = V + dV
            if np.max(np.abs(dV) / np.abs(V)) < 1e-13:
                break
        else:
            raise PlantError("reference load flow did not converge")
        F = Y @ V - b + np.conj(s / V)
        assert np.max(np.abs(F)) < 1e-10 * max(1.0, np.max(np.abs(b))), "load flow residual"
        self.Y1, self.V1 = Y, V
        # drawn fundamental current of each drive group
        self.I1d = {}
        for d in self.P["drives"]:
            if self.mode[d["name"]] == "bridge-json":
                td = self.tool_drives[d["name"]]
                self.I1d[d["name"]] = td["i1_a"] * np.exp(1j * td["i1_angle_deg"] * DEG)
            else:
                self.I1d[d["name"]] = np.conj(drive_power(d) / 3.0 / V[self.idx[d["bus"]]])

    # -- harmonics -----------------------------------------------------------------------------
    def drive_harmonics(self, d):
        """{h: drawn current phasor} for h = 2..max_order, non-triplen."""
        mode = self.mode[d["name"]]
        i1 = self.I1d[d["name"]]
        th = np.angle(i1)
        out = {}
        if mode == "table":
            # order h at angle(table) + h*theta_I1, magnitude percent of |I1| (Conventions)
            for (order, pct, ang) in d["table"]:
                if 2 <= order <= self.H and order % 3 != 0:
                    out[order] = out.get(order, 0j) + pct * abs(i1) * np.exp(
                        1j * (ang * DEG + order * th))
        else:
            td = self.tool_drives[d["name"]]
            th_tool = td["i1_angle_deg"] * DEG
            for row in td.get("harmonics", []):
                h = int(row["order"])
                if not 2 <= h <= self.H or h % 3 == 0:
                    continue
                if mode == "bridge-json":
                    out[h] = row["amps"] * np.exp(1j * row["angle_deg"] * DEG)
                else:  # active-json: relative angle re-placed at this checker's theta_I1
                    rel = row.get("angle_deg", 0.0) * DEG - h * th_tool
                    out[h] = row["percent"] / 100.0 * abs(i1) * np.exp(1j * (rel + h * th))
        return out

    def solve(self):
        self.load_flow()
        self.Vh = {1: self.V1}
        self.Idh = {d["name"]: self.drive_harmonics(d) for d in self.P["drives"]}
        for h in range(2, self.H + 1):
            if h % 3 == 0:
                # triplens: drives inject none, triplen background ignored (format 1):
                # no source, voltages 0
                self.Vh[h] = np.zeros(self.nb, dtype=complex)
                continue
            Y, I = self.assemble(h)
            for d in self.P["drives"]:
                if h in self.Idh[d["name"]]:
                    I[self.idx[d["bus"]]] -= self.Idh[d["name"]][h]  # drawn (load convention)
            self.Vh[h] = np.linalg.solve(Y, I) if np.any(I != 0) else np.zeros(self.nb, complex)

    def branch_current(self, kind, e, h):
        V = self.Vh[h]
        if kind == "transformer":
            i, k = self.idx[e["from"]], self.idx[e["to"]]
            tr = transformer_ratio(e, self.vnom(e["from"]), self.vnom(e["to"]), h)
            if tr is None:
                return 0j
            return (V[i] - tr * V[k]) / transformer_series(e, self.vnom(e["from"]), h)
        i, k = self.idx[e["from"]], self.idx[e["to"]]
        z, ysh = self.cable_zy(e, h)
        return (V[i] - V[k]) / z + ysh * V[i]  # from end, charging included

    # results in the JSON's terms --------------------------------------------------------------
    def results(self):
        R = {"buses": {}, "branches": {}, "drives": {}}
        H = self.H
        for n, i in self.idx.items():
            v1 = self.V1[i]
            hs = {h: self.Vh[h][i] for h in range(2, H + 1)}
            sumsq = sum(abs(x) ** 2 for x in hs.values())
            # THD = sqrt(sum_{h>=2} V_h^2) / V_1 (IEEE 519-2014 clause 3 definition, from memory)
            R["buses"][n] = {
                "v1_pu": abs(v1) * SQRT3 / self.vnom(n),
                "v1_angle_deg": math.degrees(np.angle(v1)),
                "thd_v_percent": 100.0 * math.sqrt(sumsq) / abs(v1),
                "vrms_pu": math.sqrt(abs(v1) ** 2 + sumsq) * SQRT3 / self.vnom(n),
                "fund": abs(v1),
                "harmonics": {h: (100.0 * abs(x) / abs(v1), x) for h, x in hs.items()},
            }
        for kind, lst in (("transformer", self.P["transformers"]), ("cable", self.P["cables"])):
            for e in lst:
                i1 = self.branch_current(kind, e, 1)
                hs = {h: self.branch_current(kind, e, h) for h in range(2, H + 1)}
                sumsq = sum(abs(x) ** 2 for x in hs.values())
                R["branches"][e["name"]] = {
                    "kind": kind, "from": e["from"], "to": e["to"],
                    "i1_a": abs(i1), "i1_angle_deg": math.degrees(np.angle(i1)),
                    # A fundamental of 1 uA or less is round-off (an idle cable): the tool
                    # reports THD and percentages as 0 there (docs/output.md).
                    "thd_i_percent": 100.0 * math.sqrt(sumsq) / abs(i1) if abs(i1) > 1e-6 else 0.0,
                    "fund": abs(i1),
                    "harmonics": {h: (x, 100.0 * abs(x) / abs(i1) if abs(i1) > 1e-6 else 0.0)
                                  for h, x in hs.items()}}
        for d in self.P["drives"]:
            i1 = self.I1d[d["name"]]
            hs = {h: self.Idh[d["name"]].get(h, 0j) for h in range(2, H + 1)}
            sumsq = sum(abs(x) ** 2 for x in hs.values())
            R["drives"][d["name"]] = {
                "mode": self.mode[d["name"]], "bus": d["bus"], "count": d["count"],
                "i1_a": abs(i1), "i1_angle_deg": math.degrees(np.angle(i1)),
                "thd_i_percent": 100.0 * math.sqrt(sumsq) / abs(i1),
                "fund": abs(i1),
                "harmonics": {h: (x, 100.0 * abs(x) / abs(i1)) for h, x in hs.items()}}
        return R


# --------------------------------------------------------------------------------------------
# Comparison.
# --------------------------------------------------------------------------------------------

RTOL = 1e-6        # relative tolerance on magnitudes
FLOOR = 1e-9       # absolute floor, as a fraction of the element's fundamental
ATOL_DEG = 1e-4    # angle tolerance where the magnitude is significant


class Comparer:
    def __init__(self):
        self.rows = []  # (ratio, what, tool, ref)
        self.count = 0

    def value(self, what, tool, ref, floor):
        self.count += 1
        if tool is None:
            self.rows.append((math.inf, what + " (missing in the tool's JSON)", None, ref))
            return
        tol = RTOL * abs(ref) + floor
        err = abs(tool - ref)
        self.rows.append((err / tol, what, tool, ref))

    def angle(self, what, tool, ref, mag, floor_mag):
        """Angles compared only where the magnitude is above the floor; the tolerance widens by
        the angle that the magnitude floor itself allows (floor/mag radians)."""
        if mag <= floor_mag:
            return
        self.count += 1
        if tool is None:
            self.rows.append((math.inf, what + " (missing in the tool's JSON)", None, ref))
            return
        err = abs((tool - ref + 180.0) % 360.0 - 180.0)
        tol = ATOL_DEG + math.degrees(floor_mag / mag)
        self.rows.append((err / tol, what, tool, ref))

    def fail(self, what):
        self.count += 1
        self.rows.append((math.inf, what, None, None))


def compare(ref, plant, tool):
    C = Comparer()
    H = plant["study"]["max_order"]
    if tool.get("study", {}).get("max_order") != H:
        C.fail(f"study.max_order: tool {tool.get('study', {}).get('max_order')} vs {H}")
    tb = {b["name"]: b for b in tool.get("buses", [])}
    for n, r in ref["buses"].items():
        b = tb.get(n)
        if b is None:
            C.fail(f"bus {n} missing")
            continue
        C.value(f"bus {n} v1_pu", b.get("v1_pu"), r["v1_pu"], 0.0)
        C.angle(f"bus {n} v1_angle_deg", b.get("v1_angle_deg"), r["v1_angle_deg"], 1.0, 0.0)
        C.value(f"bus {n} thd_v_percent", b.get("thd_v_percent"), r["thd_v_percent"], 100 * FLOOR)
        C.value(f"bus {n} vrms_pu", b.get("vrms_pu"), r["vrms_pu"], 0.0)
        th = {int(x["order"]): x for x in b.get("harmonics", [])}
        for h, (pct, ph) in r["harmonics"].items():
            x = th.get(h)
            if x is None:
                C.fail(f"bus {n} h{h} missing")
                continue
            C.value(f"bus {n} h{h} percent", x.get("percent"), pct, 100 * FLOOR)
            C.angle(f"bus {n} h{h} angle_deg", x.get("angle_deg"), math.degrees(np.angle(ph)),
                    pct, 100 * FLOOR)
    tbr = {b["name"]: b for b in tool.get("branches", [])}
    for n, r in ref["branches"].items():
        b = tbr.get(n)
        if b is None:
            C.fail(f"branch {n} missing")
            continue
        if b.get("kind") != r["kind"] or b.get("from") != r["from"] or b.get("to") != r["to"]:
            C.fail(f"branch {n}: kind/from/to {b.get('kind')}/{b.get('from')}/{b.get('to')}")
        # Currents below 1 uA are round-off on both sides (an idle cable): compare magnitudes
        # with that absolute floor and skip their angles.
        fl = max(FLOOR * r["fund"], 1e-6)
        C.value(f"branch {n} i1_a", b.get("i1_a"), r["i1_a"], fl)
        C.angle(f"branch {n} i1_angle_deg", b.get("i1_angle_deg"), r["i1_angle_deg"],
                r["fund"], 1e-6)
        C.value(f"branch {n} thd_i_percent", b.get("thd_i_percent"), r["thd_i_percent"],
                100 * FLOOR)
        th = {int(x["order"]): x for x in b.get("harmonics", [])}
        for h, (ph, pct) in r["harmonics"].items():
            x = th.get(h)
            if x is None:
                C.fail(f"branch {n} h{h} missing")
                continue
            C.value(f"branch {n} h{h} amps", x.get("amps"), abs(ph), fl)
            C.value(f"branch {n} h{h} percent", x.get("percent"), pct, 100 * FLOOR)
            C.angle(f"branch {n} h{h} angle_deg", x.get("angle_deg"),
                    math.degrees(np.angle(ph)), abs(ph), fl)
    td = {d["name"]: d for d in tool.get("drives", [])}
    for n, r in ref["drives"].items():
        d = td.get(n)
        if d is None:
            C.fail(f"drive {n} missing")
            continue
        if r["mode"] == "bridge-json":
            continue  # taken from the tool: nothing independent to compare
        fl = FLOOR * r["fund"]
        C.value(f"drive {n} i1_a", d.get("i1_a"), r["i1_a"], fl)
        C.angle(f"drive {n} i1_angle_deg", d.get("i1_angle_deg"), r["i1_angle_deg"],
                r["fund"], 0.0)
        th = {int(x["order"]): x for x in d.get("harmonics", [])}
        if r["mode"] == "table":
            C.value(f"drive {n} thd_i_percent", d.get("thd_i_percent"), r["thd_i_percent"],
                    100 * FLOOR)
        for h, (ph, pct) in r["harmonics"].items():
            x = th.get(h)
            if x is None:
                C.fail(f"drive {n} h{h} missing")
                continue
            C.value(f"drive {n} h{h} amps", x.get("amps"), abs(ph), fl)
            if r["mode"] == "table":
                C.value(f"drive {n} h{h} percent", x.get("percent"), pct, 100 * FLOOR)
            C.angle(f"drive {n} h{h} angle_deg", x.get("angle_deg"),
                    math.degrees(np.angle(ph)), abs(ph), fl)
    return C


def main(argv):
    import argparse
    import json
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("binary")
    ap.add_argument("plant")
    ap.add_argument("--show", type=int, default=15, help="worst mismatches to list")
    ap.add_argument("--keep-json", help="also write the tool's JSON here")
    a = ap.parse_args(argv)

    with tempfile.TemporaryDirectory() as tmp:
        out = a.keep_json or os.path.join(tmp, "study.json")
        proc = subprocess.run([a.binary, "study", a.plant, "--json", out],
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
        if proc.returncode not in (0, 3):
            print(f"overtone study failed with status {proc.returncode}:\n{proc.stderr}")
            return 2
        with open(out, encoding="utf-8") as f:
            tool = json.load(f)

    if tool["study"].get("summation", "vector") != "vector":
        # The reference solves the network (vector summation) only; other rules combine each
        # source's magnitudes and are checked by tests/summation_test.cc.
        print(f"{os.path.basename(a.plant)}: summation {tool['study']['summation']}: not compared")
        return 0

    try:
        plant = build_plant(load_raw(a.plant))
        R = Reference(plant, tool)
        R.solve()
        ref = R.results()
    except PlantError as e:
        print(f"reference: {e}")
        return 2
    C = compare(ref, plant, tool)
    for note in R.notes:
        print("note:", note)
    rows = sorted(C.rows, key=lambda r: -r[0])
    bad = [r for r in rows if r[0] > 1.0]
    nb, nbr, nd = len(ref["buses"]), len(ref["branches"]), len(ref["drives"])
    print(f"{os.path.basename(a.plant)}: {C.count} values compared "
          f"({nb} buses, {nbr} branches, {nd} drives, orders 2..{plant['study']['max_order']}); "
          f"worst error/tolerance {rows[0][0]:.3g}" if rows else "nothing compared")
    if not bad:
        print("agreement: all within tolerance (rel 1e-6, angles 1e-4 deg)")
        return 0
    print(f"MISMATCH: {len(bad)} values out of tolerance; worst {min(a.show, len(bad))}:")
    for ratio, what, tv, rv in bad[:a.show]:
        print(f"  {what}: tool {tv!r}  reference {rv!r}  (error/tol {ratio:.3g})")
    return 1


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
