"""The DAC's settings, from command-line options, an inline list or a design file, checked.

A design file (``dac.yaml``; ``synccore dac --save`` writes one) holds the settings
and, optionally, the network as built, bit 0 first::

    io: 3.3V               # the bank's I/O voltage
    load: 75               # the monitor's termination, ohms
    series: E24            # E24, E48 or E96 (IEC 60063)
    topology: weighted     # weighted or r2r
    pin_resistance: 0      # the pin's output resistance, ohms
    pin_current: 8mA       # optional limits, judged
    bank_current: 24mA
    resistors:             # optional: the network you built
      red: [2k, 1k, 470]             # weighted: one per bit, bit 0 first
      blue: {leg: 390, ladder: 160}  # r2r: the 2R legs (and termination) and the R rungs

Every problem is collected and reported at once, located in the file (or naming the
option), as a :class:`~synccore.errors.SpecError`.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from synccore.analog import eseries
from synccore.analog.design import TOPOLOGIES, DacDesign, DacOptions, DesignError, design, evaluate
from synccore.analog.network import Network, r2r, weighted
from synccore.errors import Location, Problem, SpecError
from synccore.spec import Located, Node, Scalar, Spec, load_file, load_text
from synccore.units import parse_quantity

MAX_IO_V = Fraction(36, 10)
_R2R_KEYS = {"leg", "ladder"}


@dataclass(frozen=True)
class _Number:
    unit: str
    ok: Callable[[Fraction], bool]
    allowed: str


NUMBERS = {
    "io": _Number("V", lambda v: 0 < v <= MAX_IO_V,
                  "a bank voltage above 0 V and at most 3.6 V, e.g. 3.3V (never a 5 V logic output)"),
    "load": _Number("ohm", lambda v: 0 < v <= 10**6, "a resistance above 0 and at most 1M ohm, e.g. 75"),
    "pin_resistance": _Number("ohm", lambda v: 0 <= v <= 10**4,
                              "a resistance from 0 to 10k ohm, e.g. 25"),
    "pin_current": _Number("A", lambda v: 0 < v <= 1, "a current above 0 and at most 1 A, e.g. 8mA"),
    "bank_current": _Number("A", lambda v: 0 < v <= 10, "a current above 0 and at most 10 A, e.g. 48mA"),
}  # fmt: skip
CHOICES = {"series": tuple(eseries.SERIES), "topology": TOPOLOGIES}
KEYS = (*NUMBERS, *CHOICES, "resistors")
CHANNELS = ("red", "green", "blue")


@dataclass(frozen=True)
class Settings:
    """Checked settings (only those given) and the built network's values, if any."""

    values: dict[str, Any]
    resistors: Located | None = None

    def merged(self, over: Settings) -> Settings:
        """These settings with ``over``'s given values on top."""
        return Settings(self.values | over.values, over.resistors or self.resistors)

    def options(self) -> DacOptions:
        names = {"io": "io_v", "load": "load_ohm", "series": "series", "topology": "topology",
                 "pin_resistance": "pin_ohm", "pin_current": "pin_current_a",
                 "bank_current": "bank_current_a"}  # fmt: skip
        return DacOptions(**{names[k]: v for k, v in self.values.items()})


def check(pairs: dict[str, tuple[Any, Location | None]], labels: dict[str, str] | None = None) -> Settings:
    """Settings from ``name → (value, location)``; every problem at once as a SpecError.

    ``labels`` names a setting in the messages (``--io`` for an option) when not its key.
    """
    problems: list[Problem] = []
    values: dict[str, Any] = {}
    for key, (raw, where) in pairs.items():
        label = (labels or {}).get(key, key)
        if key in NUMBERS:
            spec = NUMBERS[key]
            number = parse_quantity(raw, spec.unit)
            if number is None or not spec.ok(number):
                problems.append(Problem(where, label, f"got {raw!r}; allowed: {spec.allowed}"))
            else:
                values[key] = number
        elif key in CHOICES:
            if raw not in CHOICES[key]:
                problems.append(Problem(where, label, f"got {raw!r}; allowed: {', '.join(CHOICES[key])}"))
            else:
                values[key] = raw
        elif key != "resistors":
            problems.append(Problem(where, label, f"unknown setting; allowed: {', '.join(KEYS)}"))
    if problems:
        raise SpecError(problems)
    return Settings(values)


def inline(text: str, option: str) -> Settings:
    """``io=3.3V,series=E24`` as given to an option (no resistors inline)."""
    pairs: dict[str, tuple[Any, Location | None]] = {}
    for item in filter(None, (part.strip() for part in text.split(","))):
        key, eq, value = item.partition("=")
        if not eq:
            raise SpecError([Problem(None, option, f"{item!r} is not name=value; e.g. io=3.3V,series=E24")])
        pairs[key.strip()] = (value.strip(), None)
    return check(pairs, {k: f"{option} {k}" for k in pairs})


def read(path: str, *, text: str | None = None) -> Settings:
    """A design file's settings and network, every problem located."""
    doc = load_text(text, path) if text is not None else load_file(path)
    if not isinstance(doc, Located) or not isinstance(doc.value, dict):
        raise SpecError([Problem(doc.location, "", "a DAC design file is a mapping of settings")])
    pairs: dict[str, tuple[Any, Location | None]] = {}
    for key, node in doc.value.items():
        if isinstance(node, Scalar):
            pairs[key] = (node.value, node.location)
        elif key != "resistors":
            pairs[key] = ("a list or mapping", doc.key_locations.get(key, node.location))
    settings = check(pairs)
    res = doc.value.get("resistors")
    return Settings(settings.values, _resistor_nodes(res) if res is not None else None)


def _resistor_nodes(node: Node) -> Located:
    """The ``resistors`` mapping, its values still located for :func:`networks`."""
    if not isinstance(node, Located) or not isinstance(node.value, dict):
        raise SpecError([Problem(node.location, "resistors", "a mapping of channel: values")])
    return node


def networks(settings: Settings, bits: dict[str, int], opts: DacOptions) -> dict[str, Network] | None:
    """The built network per channel from the file's ``resistors``, checked against the spec's bits."""
    node = settings.resistors
    if node is None:
        return None
    problems: list[Problem] = []
    out: dict[str, Network] = {}
    for name, value in node.value.items():
        where = node.key_locations.get(name, node.location)
        path = f"resistors.{name}"
        if name not in bits:
            problems.append(Problem(where, path, f"unknown channel; allowed: {', '.join(bits)}"))
            continue
        net = _network(value, path, bits[name], opts, problems)
        if net is not None:
            out[name] = net
    for name in bits:
        if name not in node.value:
            problems.append(Problem(node.location, f"resistors.{name}", "missing; give every channel"))
    if problems:
        raise SpecError(problems)
    return out


def _network(value: Node, path: str, n: int, opts: DacOptions, problems: list[Problem]) -> Network | None:
    if opts.topology == "weighted":
        if not isinstance(value, Located) or not isinstance(value.value, list) or len(value.value) != n:
            problems.append(Problem(value.location, path, f"a list of {n} resistances, bit 0 first "
                                    f"(the spec's colour depth gives this channel {n} bits)"))  # fmt: skip
            return None
        legs = [_ohm(v, f"{path}[{i}]", problems) for i, v in enumerate(value.value)]
        return weighted(legs, opts.load_ohm, opts.pin_ohm) if None not in legs else None  # type: ignore[arg-type]
    if not isinstance(value, Located) or not isinstance(value.value, dict) or set(value.value) != _R2R_KEYS:
        problems.append(Problem(value.location, path, "for an r2r ladder: {leg: 2R value, ladder: R value}"))
        return None
    leg = _ohm(value.value["leg"], f"{path}.leg", problems)
    ladder = _ohm(value.value["ladder"], f"{path}.ladder", problems)
    return r2r(leg, ladder, n, opts.load_ohm, opts.pin_ohm) if leg and ladder else None


def _ohm(node: Node, path: str, problems: list[Problem]) -> Fraction | None:
    number = parse_quantity(node.value, "ohm") if isinstance(node, Scalar) else None
    if number is None or not 0 < number <= 10**7:
        problems.append(Problem(node.location, path, "a resistance above 0 and at most 10M ohm, e.g. 2.2k"))
        return None
    return number


def realise(settings: Settings, bits: dict[str, int]) -> DacDesign:
    """The network the settings describe: the one built (``resistors``), else the best designed.

    Raises :class:`~synccore.analog.design.DesignError` when ``io`` is missing or no network can
    reach the video level, and :class:`SpecError` when the built network does not fit ``bits``.
    """
    if "io" not in settings.values:
        raise DesignError("io: give the bank's I/O voltage, e.g. --io 3.3V (or io: 3.3V in the design file)")
    opts = settings.options()
    built = networks(settings, bits, opts)
    return evaluate(built, opts) if built is not None else design(bits, opts)


def design_dac(spec: Spec, *, io: object, design_file: str | None = None, **settings: object) -> DacDesign:
    """A resistor DAC for ``spec``'s colour depth (``spec.color``): designed, or judged when the
    design file gives the network built.

    ``io`` is the bank voltage (``3.3``, ``"3.3V"``); further settings by their design-file
    names: ``load``, ``series``, ``topology``, ``pin_resistance``, ``pin_current``,
    ``bank_current`` (numbers in V, ohm, A, or strings with units).  Keyword arguments win
    over the file.  Raises ``ValueError`` for a setting out of range or a bank voltage no
    network can use, and :class:`SpecError` for a design file's problems (every one, located).
    """
    try:
        over = check({k: (v, None) for k, v in {"io": io, **settings}.items()})
    except SpecError as err:
        raise ValueError("; ".join(str(p) for p in err.problems)) from None
    base = read(design_file) if design_file is not None else Settings({})
    bits = {"red": spec.color.red, "green": spec.color.green, "blue": spec.color.blue}
    return realise(base.merged(over), bits)
