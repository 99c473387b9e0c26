"""The VCD text format (IEEE 1364-2005 section 18), read with every part checked.

A problem is one line naming the file, the line and column, and what was expected:
truncated or unbalanced scopes, a variable without a size or with a size out of range,
timestamps that are not whole numbers or run backwards, values that are not binary or
not finite reals, a timescale that is not 1, 10 or 100 of s, ms, us, ns, ps, fs or as.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterator
from pathlib import Path

UNITS = {"s": 1.0, "ms": 1e-3, "us": 1e-6, "ns": 1e-9, "ps": 1e-12, "fs": 1e-15, "as": 1e-18}
MAX_VAR_BITS = 4096
"""Widest variable accepted in a VCD (wider ones are refused, not guessed)."""

_TOKEN = re.compile(rb"\S+")
_TIMESCALE = re.compile(r"(1|10|100)\s*(s|ms|us|ns|ps|fs|as)\Z")
_BITS = re.compile(r"[01xXzZuUwWlLhH-]+\Z")

Changes = dict[object, tuple[list[int], list[int]]]
Names = dict[str, tuple[object, int]]


class VcdFormatError(ValueError):
    """One located line: ``file:line:col: what is wrong; what is expected``."""


class _Tokens:
    def __init__(self, path: Path, data: bytes, start: int = 0) -> None:
        self.path, self.data = path, data
        self._it: Iterator[re.Match[bytes]] = _TOKEN.finditer(data, start)
        self.last: re.Match[bytes] | None = None

    def next(self, wanted: str) -> str:
        self.last = next(self._it, None)
        if self.last is None:
            raise self.error(f"the file ends where {wanted} was expected", at_end=True)
        return self.last.group().decode("utf-8", "replace")

    def __iter__(self) -> Iterator[tuple[str, int]]:
        for m in self._it:
            self.last = m
            yield m.group().decode("utf-8", "replace"), m.start()

    def where(self, pos: int) -> str:
        line = self.data.count(b"\n", 0, pos) + 1
        col = pos - (self.data.rfind(b"\n", 0, pos) + 1) + 1
        return f"{self.path}:{line}:{col}"

    def error(self, message: str, *, at_end: bool = False, pos: int | None = None) -> VcdFormatError:
        if pos is None:
            pos = len(self.data) if at_end or self.last is None else self.last.start()
        return VcdFormatError(f"{self.where(pos)}: {_printable(message)}")


def _printable(text: str) -> str:
    """Escape what could break the one-line message (a token may hold any byte)."""
    return "".join(c if c.isprintable() else repr(c)[1:-1] for c in text)


def parse_header(path: Path, data: bytes) -> tuple[float, Names, int]:
    """Timescale in seconds, ``{dotted name: (code, bits)}`` and the offset where changes start."""
    toks = _Tokens(path, data)
    scale, scope = 1e-9, []
    names: Names = {}
    while True:
        tok = toks.next("$enddefinitions")
        if tok == "$timescale":
            scale = _timescale(toks)
        elif tok == "$scope":
            toks.next("the scope's type")
            scope.append(toks.next("the scope's name"))
            _end(toks, "$scope")
        elif tok == "$upscope":
            if not scope:
                raise toks.error("$upscope without an open $scope")
            scope.pop()
            _end(toks, "$upscope")
        elif tok == "$var":
            code, bits, name = _var(toks)
            names[".".join([*scope, name])] = (code, bits)
        elif tok == "$enddefinitions":
            _end(toks, "$enddefinitions")
            if scope:
                raise toks.error(f"$enddefinitions with {len(scope)} scope(s) still open ($upscope missing)")
            assert toks.last is not None
            return scale, names, toks.last.end()
        elif tok.startswith("$"):
            _skip_to_end(toks, tok)


def _end(toks: _Tokens, what: str) -> None:
    tok = toks.next(f"$end after {what}")
    if tok != "$end":
        raise toks.error(f"expected $end to close {what}, got {tok[:20]!r}")


def _skip_to_end(toks: _Tokens, what: str) -> None:
    while toks.next(f"$end after {what}") != "$end":
        pass


def _timescale(toks: _Tokens) -> float:
    words = []
    first: int | None = None
    while (tok := toks.next("$end after $timescale")) != "$end":
        words.append(tok)
        first = first if first is not None or toks.last is None else toks.last.start()
    m = _TIMESCALE.match("".join(words))
    if m is None:
        got = " ".join(words)[:30]
        raise toks.error(pos=first, message=f"timescale {got!r}: expected 1, 10 or 100 followed by "
                         "s, ms, us, ns, ps, fs or as")  # fmt: skip
    return int(m.group(1)) * UNITS[m.group(2)]


def _var(toks: _Tokens) -> tuple[str, int, str]:
    toks.next("the variable's type")
    size = toks.next("the variable's size")
    if not size.isdigit() or not 1 <= int(size[:6]) <= MAX_VAR_BITS or len(size) > 6:
        raise toks.error(f"variable size {size[:20]!r}: expected a whole number of bits from 1 to "
                         f"{MAX_VAR_BITS}")  # fmt: skip
    code = toks.next("the variable's identifier code")
    name = toks.next("the variable's name")
    if name == "$end":
        raise toks.error("$var without a name")
    while (tok := toks.next("$end after $var")) != "$end":
        if tok.startswith("$"):
            raise toks.error(f"expected $end to close $var, got {tok[:20]!r}")
    return code, int(size), name


def load_changes(path: Path, data: bytes, start: int, codes: set[object], bits: dict[object, int]) -> Changes:
    """The value changes of ``codes``, checked: times whole and non-decreasing, values binary."""
    changes: Changes = {c: ([], []) for c in codes}
    toks = _Tokens(path, data, start)
    now = 0  # changes before the first timestamp (some writers put $dumpvars first) are at 0
    pending: Callable[[str], None] | None = None
    for tok, pos in toks:
        if pending is not None:
            pending(tok)
            pending = None
            continue
        c0 = tok[0]
        if c0 == "#":
            t = tok[1:]
            if not t.isdigit() or len(t) > 18:
                raise toks.error(f"timestamp {tok[:20]!r}: expected # and a whole number of time units")
            if int(t) < now:
                raise toks.error(f"timestamp {tok} runs backwards (after #{now})")
            now = int(t)
        elif c0 in "bB":
            value = _vector(toks, tok[1:])
            pending = _recorder(changes, now, value, toks, (pos, bits))
        elif c0 in "rR":
            _real(toks, tok[1:])
            pending = _recorder(changes, now, None, toks, (pos, bits))
        elif c0 in "01xXzZuUwWlLhH-":
            if len(tok) < 2:
                raise toks.error(f"value {tok!r} without an identifier code")
            if tok[1:] in changes:
                changes[tok[1:]][0].append(now)
                changes[tok[1:]][1].append(1 if c0 == "1" else 0)
        elif tok == "$comment":
            _skip_to_end(toks, tok)
        elif c0 == "$":
            continue  # $dumpvars, $dumpon, $end ... group changes; they carry no values themselves
        else:
            raise toks.error(f"unexpected {tok[:20]!r}: expected #time, a value change or a $keyword")
    if pending is not None:
        raise toks.error("the file ends inside a value change (identifier code missing)", at_end=True)
    return changes


def _vector(toks: _Tokens, text: str) -> int:
    if not text or not _BITS.match(text) or len(text) > MAX_VAR_BITS:
        raise toks.error(f"vector value {text[:20]!r}: expected binary digits (0, 1, x, z)")
    if any(c in text.lower() for c in "xzuwlh-"):
        return 0
    return int(text, 2)


def _real(toks: _Tokens, text: str) -> None:
    try:
        value = float(text)
    except ValueError:
        raise toks.error(f"real value {text[:20]!r}: expected a number") from None
    if not math.isfinite(value):
        raise toks.error(f"real value {text[:20]!r}: expected a finite number")


def _recorder(changes: Changes, now: int, value: int | None, toks: _Tokens,
              at: tuple[int, dict[object, int]]) -> Callable[[str], None]:  # fmt: skip
    """Records a vector or real change once its code is read; ``at``: the value's offset, the widths."""
    pos, bits = at

    def record(code: str) -> None:
        if code not in changes:
            return
        if value is None:
            raise toks.error(f"{code!r} changes to a real value; a display pin must be a bit or a vector")
        if value >> bits[code]:
            raise toks.error(pos=pos, message=f"a value of {code!r} is wider than its {bits[code]} bits")
        changes[code][0].append(now)
        changes[code][1].append(value)
    return record
