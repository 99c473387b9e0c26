"""Designing a VGA resistor DAC: values from an E series, judged exactly into the real load.

The target is the analog video level, 0.700 V full scale into the monitor's 75 Ω
termination (VESA Video Signal Standard, VSIS 1.0: 0.700 V reference white into
75 Ω; from memory).  For each channel the designer takes the ideal resistors of the
topology, tries the neighbouring values of the series for each, ranks the networks
by how far they stray from the aims below (floats, for speed), and analyses the best
ones exactly (:mod:`synccore.analog.network`).

Aims (synccore's, common practice for a picture that looks right): full scale within
±2 % of 0.7 V, monotonic, |DNL| and |INL| under 0.5 LSB, and the pin and bank
currents inside the limits the user gives.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from synccore.analog import eseries
from synccore.analog.network import OUT, Network, node_voltages, r2r, weighted

VIDEO_FULL_SCALE_V = Fraction(7, 10)
TOPOLOGIES = ("weighted", "r2r")
FULL_SCALE_AIM = Fraction(2, 100)
LINEARITY_AIM = Fraction(1, 2)
RUNNERS_UP = 3


class DesignError(ValueError):
    """Options no network can meet (the bank voltage below the video level, ...)."""


@dataclass(frozen=True)
class DacOptions:
    io_v: Fraction
    load_ohm: Fraction = Fraction(75)
    series: str = "E24"
    topology: str = "weighted"
    pin_ohm: Fraction = Fraction(0)
    pin_current_a: Fraction | None = None
    bank_current_a: Fraction | None = None
    full_scale_v: Fraction = VIDEO_FULL_SCALE_V


@dataclass(frozen=True)
class Channel:
    """One channel's network and every figure of it, exact."""

    name: str
    network: Network
    levels: tuple[Fraction, ...]
    full_scale_error: Fraction
    dnl: tuple[Fraction, ...]
    inl: tuple[Fraction, ...]
    pin_current_a: tuple[Fraction, ...]
    bank_current_a: Fraction
    power_w: dict[str, Fraction]
    problems: tuple[str, ...] = ()

    @property
    def bits(self) -> int:
        return self.network.bits

    @property
    def monotonic(self) -> bool:
        return all(b > a for a, b in itertools.pairwise(self.levels))

    @property
    def worst_dnl(self) -> Fraction:
        return max((abs(d) for d in self.dnl), default=Fraction(0))

    @property
    def worst_inl(self) -> Fraction:
        return max(abs(d) for d in self.inl)

    @property
    def resistors(self) -> tuple[Fraction, ...]:
        """The resistor of each bit's pin, bit 0 first."""
        return tuple(br.ohm for br in self.network.branches if br.a.startswith("pin"))

    @property
    def meets(self) -> bool:
        return not self.problems


@dataclass(frozen=True)
class ChannelChoice:
    best: Channel
    runners_up: tuple[Channel, ...] = ()


@dataclass(frozen=True)
class DacDesign:
    options: DacOptions
    channels: dict[str, ChannelChoice] = field(default_factory=dict)

    @property
    def bank_current_a(self) -> Fraction:
        return sum((c.best.bank_current_a for c in self.channels.values()), Fraction(0))

    @property
    def problems(self) -> list[str]:
        out = [f"{name}: {p}" for name, c in self.channels.items() for p in c.best.problems]
        limit = self.options.bank_current_a
        if limit is not None and self.bank_current_a > limit:
            out.append(f"bank: {_ma(self.bank_current_a)} from the bank in all is over the "
                       f"{_ma(limit)} limit")  # fmt: skip
        return out


def analyse(name: str, net: Network, opts: DacOptions) -> Channel:
    """Every figure of ``net`` driven from ``opts.io_v`` into its load, exactly."""
    n = net.bits
    unit = [node_voltages(net, (i,), opts.io_v) for i in range(n)]
    codes = range(2**n)
    nodes = [
        {node: sum((unit[i][node] for i in range(n) if c >> i & 1), Fraction(0)) for node in net.inner}
        | {f"pin{i}": (opts.io_v if c >> i & 1 else Fraction(0)) for i in range(n)} | {"gnd": Fraction(0)}
        for c in codes
    ]
    levels = tuple(v[OUT] for v in nodes)
    lsb = (levels[-1] - levels[0]) / (2**n - 1)
    dnl = tuple((b - a) / lsb - 1 for a, b in itertools.pairwise(levels))
    inl = tuple((v - levels[0] - k * lsb) / lsb for k, v in enumerate(levels))
    pin_i = [Fraction(0)] * n
    bank = Fraction(0)
    power: dict[str, Fraction] = {}
    for v in nodes:
        sourced = Fraction(0)
        for br in net.branches:
            current = (v[br.a] - v[br.b]) / br.total_ohm
            power[br.name] = max(power.get(br.name, Fraction(0)), current * current * br.ohm)
            if br.a.startswith("pin"):
                k = int(br.a[3:])
                pin_i[k] = max(pin_i[k], abs(current))
                sourced += max(current, Fraction(0))
        bank = max(bank, sourced)
    ch = Channel(name, net, levels, levels[-1] / opts.full_scale_v - 1, dnl, inl, tuple(pin_i), bank, power)
    return Channel(**{**vars(ch), "problems": tuple(_problems(ch, opts))})


def _problems(ch: Channel, opts: DacOptions) -> list[str]:
    out = []
    if abs(ch.full_scale_error) > FULL_SCALE_AIM:
        out.append(f"full scale {float(ch.levels[-1]):.3f} V is {_pct(ch.full_scale_error)} from "
                   f"{float(opts.full_scale_v):.3f} V (aim: within 2 %)")  # fmt: skip
    if not ch.monotonic:
        k = next(k for k, (a, b) in enumerate(itertools.pairwise(ch.levels)) if b <= a)
        out.append(f"not monotonic: code {k + 1} gives {float(ch.levels[k + 1]):.3f} V, not above code "
                   f"{k}'s {float(ch.levels[k]):.3f} V")  # fmt: skip
    if ch.worst_dnl >= LINEARITY_AIM:
        out.append(f"|DNL| reaches {float(ch.worst_dnl):.2f} LSB (aim: under 0.5)")
    if ch.worst_inl >= LINEARITY_AIM:
        out.append(f"|INL| reaches {float(ch.worst_inl):.2f} LSB (aim: under 0.5)")
    if opts.pin_current_a is not None and max(ch.pin_current_a) > opts.pin_current_a:
        k = max(range(ch.bits), key=lambda i: ch.pin_current_a[i])
        out.append(f"bit {k}'s pin carries {_ma(ch.pin_current_a[k])}, over the "
                   f"{_ma(opts.pin_current_a)} pin limit")  # fmt: skip
    return out


def _pct(x: Fraction) -> str:
    return f"{float(x) * 100:+.2f} %"


def _ma(a: Fraction) -> str:
    return f"{float(a) * 1000:.2f} mA"


def design(bits: dict[str, int], opts: DacOptions) -> DacDesign:
    """The best network per channel (``bits``: channel name → bit count) and the runners-up."""
    _check(opts, bits)
    by_bits: dict[int, ChannelChoice] = {}
    out: dict[str, ChannelChoice] = {}
    for name, n in bits.items():
        if n not in by_bits:
            by_bits[n] = _choose(n, opts)
        choice = by_bits[n]
        runners = tuple(_renamed(c, name) for c in choice.runners_up)
        out[name] = ChannelChoice(_renamed(choice.best, name), runners)
    return DacDesign(opts, out)


def evaluate(networks: dict[str, Network], opts: DacOptions) -> DacDesign:
    """A network the user built (or means to), judged like a designed one."""
    return DacDesign(opts, {name: ChannelChoice(analyse(name, net, opts)) for name, net in networks.items()})


def _renamed(ch: Channel, name: str) -> Channel:
    return ch if ch.name == name else Channel(**{**vars(ch), "name": name})


def _check(opts: DacOptions, bits: dict[str, int]) -> None:
    if opts.topology not in TOPOLOGIES:
        raise DesignError(f"topology {opts.topology!r}: allowed are {', '.join(TOPOLOGIES)}")
    if opts.series not in eseries.SERIES:
        raise DesignError(f"series {opts.series!r}: allowed are {', '.join(eseries.SERIES)}")
    for name, n in bits.items():
        reach = opts.io_v * (2**n - 1) / 2**n if opts.topology == "r2r" else opts.io_v
        if reach <= opts.full_scale_v:
            raise DesignError(f"{name}: a {opts.topology} network from {float(opts.io_v):g} V reaches at "
                              f"most {float(reach):.3f} V unloaded; the video level is "
                              f"{float(opts.full_scale_v):.3f} V: use a higher bank voltage")  # fmt: skip


def _choose(n: int, opts: DacOptions) -> ChannelChoice:
    """Rank the series' neighbours of the ideal values, then analyse the best few exactly."""
    nets = _weighted_candidates(n, opts) if opts.topology == "weighted" else _r2r_candidates(n, opts)
    ranked = sorted(nets, key=lambda item: item[0])[: 2 * (RUNNERS_UP + 1)]
    exact = sorted((analyse("", net, opts) for _, net in ranked), key=_rank)
    return ChannelChoice(exact[0], tuple(exact[1 : RUNNERS_UP + 1]))


def _rank(ch: Channel) -> tuple[int, float, tuple[Fraction, ...]]:
    merit = max(abs(ch.full_scale_error) / FULL_SCALE_AIM, ch.worst_dnl / LINEARITY_AIM,
                ch.worst_inl / LINEARITY_AIM)  # fmt: skip
    return (len(ch.problems), float(merit), ch.resistors)


def _weighted_candidates(n: int, opts: DacOptions) -> list[tuple[tuple[float, tuple[float, ...]], Network]]:
    """Every combination of the neighbours of the ideal binary-weighted legs, scored in floats."""
    g_load = 1 / float(opts.load_ohm)
    fs, v_io, r_pin = float(opts.full_scale_v), float(opts.io_v), float(opts.pin_ohm)
    g_total = g_load * fs / (v_io - fs)
    ideal = [(2**n - 1) / (2**i * g_total) - r_pin for i in range(n)]
    if ideal[-1] <= 0:
        raise DesignError(f"the pin's output resistance ({r_pin:g} Ω) is larger than the most "
                          f"significant bit's resistor should be ({ideal[-1] + r_pin:.1f} Ω)")  # fmt: skip
    near = [eseries.around(r, opts.series, 3 if n <= 5 else 2) for r in ideal]
    codes = _codes(n)
    out = []
    for combo in itertools.product(*near):
        g = 1 / (np.array([float(r) for r in combo]) + r_pin)
        levels = codes @ (v_io * g / (g.sum() + g_load))
        out.append((_float_merit(levels, fs, combo), weighted(combo, opts.load_ohm, opts.pin_ohm)))
    return out


def _r2r_candidates(n: int, opts: DacOptions) -> list[tuple[tuple[float, tuple[float, ...]], Network]]:
    """Neighbours of the ideal ladder (R) and leg (2R) values; few enough to solve each exactly."""
    fs, v_io, r_pin = float(opts.full_scale_v), float(opts.io_v), float(opts.pin_ohm)
    r = float(opts.load_ohm) * (v_io * (2**n - 1) / 2**n / fs - 1)
    if 2 * r - r_pin <= 0:
        raise DesignError(f"the pin's output resistance ({r_pin:g} Ω) is larger than the ladder's "
                          f"legs should be ({2 * r:.1f} Ω)")  # fmt: skip
    out = []
    for ladder, leg in itertools.product(eseries.around(r, opts.series, 5),
                                         eseries.around(2 * r - r_pin, opts.series, 5)):  # fmt: skip
        net = r2r(leg, ladder, n, opts.load_ohm, opts.pin_ohm)
        unit = np.array([float(node_voltages(net, (i,), opts.io_v)[OUT]) for i in range(n)])
        out.append((_float_merit(_codes(n) @ unit, fs, (ladder, leg)), net))
    return out


def _codes(n: int) -> np.ndarray:
    """Row c holds the bits of code c (bit 0 first): levels = codes @ per-bit levels (superposition)."""
    return np.array([[c >> i & 1 for i in range(n)] for c in range(2**n)], dtype=float)


def _float_merit(levels: np.ndarray, fs: float, combo: tuple[Fraction, ...]
                 ) -> tuple[float, tuple[float, ...]]:  # fmt: skip
    lsb = (levels[-1] - levels[0]) / (len(levels) - 1)
    steps = np.diff(levels) / lsb - 1 if len(levels) > 1 else np.zeros(1)
    inl = (levels - levels[0] - np.arange(len(levels)) * lsb) / lsb
    merit = max(abs(levels[-1] / fs - 1) / float(FULL_SCALE_AIM), float(np.abs(steps).max()) / 0.5,
                float(np.abs(inl).max()) / 0.5)  # fmt: skip
    return (merit, tuple(float(c) for c in combo))
