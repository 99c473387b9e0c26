"""Panel datasheet ranges: ``{min, typ, max}`` in place of numbers, fitted to ``fit:``.

Part of :mod:`synccore.timings.resolve`: finds the values given as ranges, parses
them with their locations, solves for the fit target with
:mod:`synccore.timings.panel`, and writes the chosen numbers back into the
document, each located at its range.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Any

from synccore.errors import Location
from synccore.spec import (
    FIT_FIELDS,
    MAX_AXIS,
    Collector,
    Field,
    Fit,
    Located,
    Node,
    Scalar,
    ValueRange,
    check_section,
    describe_node,
    parse_frequency,
)
from synccore.timings import panel as fitting
from synccore.units import fixed, hz

AXIS_RANGED = ("front_porch", "sync", "back_porch")


def resolved_scalar(value: Any, where: Location) -> Scalar:
    """A value the resolver wrote, located at what it came from."""
    return Scalar(value, where, "tag:synccore,resolved")


@dataclass(frozen=True)
class Fitted:
    """What a fit chose: its notes, and the ranges it kept for later checks."""

    notes: tuple[str, ...]
    fit: Fit


def _range_fields(kind: str, minimum: int) -> tuple[Field, ...]:
    bound = {"minimum": minimum, "maximum": MAX_AXIS} if kind == "int" else {}
    return (
        Field("min", kind, "smallest value the datasheet allows", **bound),  # type: ignore[arg-type]
        Field("typ", kind, "typical value", required=False, **bound),  # type: ignore[arg-type]
        Field("max", kind, "largest value the datasheet allows", **bound),  # type: ignore[arg-type]
    )


def _parse_range(node: Located, kind: str, minimum: int, path: str,
                 out: Collector) -> fitting.Range | None:  # fmt: skip
    values = check_section(_range_fields(kind, minimum), node, path, out)
    if values is None:
        return None
    lo, typ, hi = (None if values[k] is None else Fraction(values[k])
                   for k in ("min", "typ", "max"))  # fmt: skip
    assert lo is not None and hi is not None
    if lo > hi:
        out.add(node.location, path, f"min must not exceed max, got min {lo} and max {hi}")
        return None
    if typ is not None and not lo <= typ <= hi:
        out.add(node.key_locations["typ"], f"{path}.typ",
                f"must lie between min {lo} and max {hi}, got {typ}")  # fmt: skip
        return None
    return fitting.Range(lo, hi, typ)


def _is_range(node: Node | None) -> bool:
    return isinstance(node, Located) and isinstance(node.value, dict)


def resolve_ranges(given: dict[str, Node], keys: dict[str, Location], doc: Located,
                   out: Collector) -> Fitted | None:  # fmt: skip
    """Resolve ``{min, typ, max}`` ranges against the ``fit:`` target, in ``given`` itself.

    Returns what the fit chose, or None when nothing was fitted (no ranges, or a
    problem recorded in ``out``).
    """
    range_nodes, axes = _find_ranges(given)
    fit_node = given.pop("fit", None)
    fit_where = keys.pop("fit", doc.location)
    if not range_nodes:
        if fit_node is not None:
            out.add(fit_where, "fit", "has nothing to choose: give at least one value as a "
                                      "range {min, typ, max}")  # fmt: skip
        return None
    ranges = _parse_ranges(range_nodes, out)
    target = _fit_target(fit_node, fit_where, range_nodes, out)
    fit_at: dict[str, Location] = ({k: n.location for k, n in fit_node.value.items()}
        if isinstance(fit_node, Located) and isinstance(fit_node.value, dict) else {})  # fmt: skip
    solved = (_solve(given, keys, axes, ranges, target, fit_where, fit_at, out)
              if target else None)  # fmt: skip
    _write_chosen(given, axes, range_nodes, ranges, solved)
    if solved is None:
        return None
    kept = tuple((p, ValueRange(r.min, r.max, r.typ)) for p, r in ranges.items() if r)
    tolerance = target["tolerance_percent"] if target and "tolerance_percent" in fit_at else None
    return Fitted(tuple(solved["__notes__"]),
                  Fit(kept, None if tolerance is None else Fraction(tolerance) / 100))


def _find_ranges(given: dict[str, Node]) -> tuple[dict[str, Located], dict[str, Located]]:
    """The values given as ranges, by dotted path, and the axis mappings."""
    range_nodes: dict[str, Located] = {}
    clock_node = given.get("pixel_clock_hz")
    if clock_node is not None and _is_range(clock_node):
        assert isinstance(clock_node, Located)
        range_nodes["pixel_clock_hz"] = clock_node
    axes: dict[str, Located] = {}
    for label in ("horizontal", "vertical"):
        a = given.get(label)
        if isinstance(a, Located) and isinstance(a.value, dict):
            axes[label] = a
            for k in AXIS_RANGED:
                if _is_range(a.value.get(k)):
                    n = a.value[k]
                    assert isinstance(n, Located)
                    range_nodes[f"{label}.{k}"] = n
    return range_nodes, axes


def _parse_ranges(range_nodes: dict[str, Located],
                  out: Collector) -> dict[str, fitting.Range | None]:  # fmt: skip
    """Every range parsed, collecting problems (None for a bad one)."""
    ranges: dict[str, fitting.Range | None] = {}
    for path, n in range_nodes.items():
        if path == "pixel_clock_hz":
            ranges[path] = _parse_range(n, "frequency", 0, path, out)
        else:
            minimum = 1 if path.endswith(".sync") else 0
            ranges[path] = _parse_range(n, "int", minimum, path, out)
    return ranges


def _fit_target(fit_node: Node | None, fit_where: Location, range_nodes: dict[str, Located],
                out: Collector) -> dict[str, Any] | None:  # fmt: skip
    """The checked ``fit:`` section; None (after a problem) when it is missing or bad."""
    if fit_node is None:
        first = min(range_nodes.values(), key=lambda n: n.location).location
        out.add(first, next(p for p, n in range_nodes.items() if n.location == first),
                "a range needs a fit: section with a refresh or pixel_clock_hz target")  # fmt: skip
        return None
    if not _is_range(fit_node):
        out.add(fit_where, "fit", f"must be a mapping of refresh, pixel_clock_hz, "
                                  f"tolerance_percent, got {describe_node(fit_node)}")  # fmt: skip
        return None
    assert isinstance(fit_node, Located)
    return check_section(FIT_FIELDS, fit_node, "fit", out)


def _write_chosen(given: dict[str, Node], axes: dict[str, Located],
                  range_nodes: dict[str, Located], ranges: dict[str, fitting.Range | None],
                  solved: dict[str, Any] | None) -> None:  # fmt: skip
    """Write the chosen numbers (or, after a problem, the typical ones) in place of the ranges."""
    for path, n in range_nodes.items():
        value: Any
        if solved is not None:
            value = solved[path]
        else:
            r = ranges[path]
            value = (int(round(r.target)) if path != "pixel_clock_hz" else r.target) if r else 1
        if path == "pixel_clock_hz":
            given["pixel_clock_hz"] = resolved_scalar(value, n.location)
        else:
            label, k = path.split(".")
            a = axes[label]
            inner = dict(a.value)
            inner[k] = resolved_scalar(value, n.location)
            axes[label] = Located(inner, a.location, dict(a.key_locations))
            given[label] = axes[label]


def _int_or_none(node: Node | None) -> int | None:
    if isinstance(node, Scalar) and isinstance(node.value, int) and \
            not isinstance(node.value, bool):  # fmt: skip
        return node.value
    return None


def _solve(given: dict[str, Node], keys: dict[str, Location],
           axes: dict[str, Located], ranges: dict[str, fitting.Range | None],
           target: dict[str, Any], fit_where: Location, fit_at: dict[str, Location],
           out: Collector) -> dict[str, Any] | None:  # fmt: skip
    """Run the fitter when every input it needs is valid; report honestly when it falls short."""
    if any(r is None for r in ranges.values()) or set(axes) != {"horizontal", "vertical"}:
        return None  # problems already recorded (or recorded later by the validator)
    built = _axis_ranges(axes, ranges)
    if built is None:
        return None
    clock_range = _clock_range(given, keys, ranges, target["pixel_clock_hz"], fit_where,
                               fit_at, out)  # fmt: skip
    if clock_range is None:
        return None
    if target["refresh"] is None and clock_range.typ is None:
        out.add(fit_where, "fit.refresh", "required key is missing (the clock range has no typ "
                                          "to take the target from)")  # fmt: skip
        return None
    tolerance = Fraction(target["tolerance_percent"]) / 100
    try:
        res = fitting.fit(built["horizontal"], built["vertical"], clock_range,
                          refresh=target["refresh"], tolerance=tolerance)  # fmt: skip
    except fitting.FitError as exc:
        out.add(fit_where, "fit", str(exc))
        return None
    off = f"{'+' if res.error >= 0 else ''}{fixed(res.error * 100, 3)} %"
    landed = (f"target {fixed(res.target_refresh_hz, 3)} Hz, landed at "
              f"{fixed(res.refresh_hz, 3)} Hz ({off})")  # fmt: skip
    # The fitter names the clock bound in plain hertz; the note prints it as every frequency is.
    raw = f"{res.pixel_clock_hz} Hz"
    bounds = [b.removesuffix(raw) + hz(res.pixel_clock_hz) if b.startswith("pixel_clock_hz") else b
              for b in res.bounds]  # fmt: skip
    bound = f"; limited by {', '.join(bounds)}" if bounds else ""
    if not res.met:
        out.add(fit_where, "fit",
                f"no values inside the datasheet ranges reach the target within "
                f"{fixed(tolerance * 100, 2)} %: {landed}{bound}")  # fmt: skip
    solved: dict[str, Any] = {"pixel_clock_hz": res.pixel_clock_hz}
    for label, chosen in (("horizontal", res.horizontal), ("vertical", res.vertical)):
        for k in AXIS_RANGED:
            solved[f"{label}.{k}"] = getattr(chosen, k)
    solved["__notes__"] = [landed + bound]
    return solved


def _axis_ranges(axes: dict[str, Located], ranges: dict[str, fitting.Range | None]
                 ) -> dict[str, fitting.AxisRanges] | None:  # fmt: skip
    """Each axis as the fitter takes it (fixed values as one-point ranges); None if one is bad."""
    built: dict[str, fitting.AxisRanges] = {}
    for label, a in axes.items():
        active = _int_or_none(a.value.get("active"))
        pol = a.value.get("sync_polarity")
        parts: dict[str, fitting.Range] = {}
        for k in AXIS_RANGED:
            path = f"{label}.{k}"
            if path in ranges:
                r = ranges[path]
                assert r is not None
                parts[k] = r
            else:
                fixed_value = _int_or_none(a.value.get(k))
                if fixed_value is None:
                    return None  # the validator reports it
                parts[k] = fitting.Range.fixed(fixed_value)
        if active is None or not isinstance(pol, Scalar):
            return None
        built[label] = fitting.AxisRanges(active, parts["front_porch"], parts["sync"],
                                          parts["back_porch"], str(pol.value))  # fmt: skip
    return built


def _clock_range(given: dict[str, Node], keys: dict[str, Location],
                 ranges: dict[str, fitting.Range | None], board: Fraction | None,
                 fit_where: Location, fit_at: dict[str, Location],
                 out: Collector) -> fitting.Range | None:  # fmt: skip
    """The pixel clocks the fitter may choose from: the datasheet range, or one fixed clock.

    ``board`` is ``fit.pixel_clock_hz``, the clock the board gives; given beside a fixed
    ``pixel_clock_hz`` it is refused, and it is written in as ``pixel_clock_hz`` when that
    is absent.  None when there is no usable clock (after a problem, or for the validator).
    """
    if "pixel_clock_hz" in ranges:
        clock_range = ranges["pixel_clock_hz"]
        assert clock_range is not None
        if board is None:
            return clock_range
        if board not in clock_range:
            out.add(fit_at.get("pixel_clock_hz", fit_where), "fit.pixel_clock_hz",
                    f"lies outside the datasheet range {hz(clock_range.min)} .. "
                    f"{hz(clock_range.max)}, got {hz(board)}")  # fmt: skip
            return None
        return fitting.Range.fixed(board)
    node = given.get("pixel_clock_hz")
    fixed_clock = parse_frequency(node.value) if isinstance(node, Scalar) else None
    if board is not None and node is not None:
        out.add(fit_at.get("pixel_clock_hz", fit_where), "fit.pixel_clock_hz",
                f"conflicts with pixel_clock_hz (at {keys['pixel_clock_hz']}); give the "
                "board clock once")  # fmt: skip
        return None
    if board is not None:
        fixed_clock = board
        given["pixel_clock_hz"] = resolved_scalar(board, fit_where)
        keys["pixel_clock_hz"] = fit_where
    if fixed_clock is None or fixed_clock <= 0:
        return None  # missing or invalid: the validator reports it
    return fitting.Range.fixed(fixed_clock)
