"""A plain textbook sync counter, to weigh the emitted core against (tests and benchmarks/fit.py).

Two counters (pixel groups in a line, lines in a frame) and every output straight from
comparators on them, combinational: what a first design of a sync generator looks like
(common practice).  It has the core's outputs (syncs, de, blanks, x/y zero in blanking,
line and frame strobes) so that the figures compare like with like.
"""

from __future__ import annotations

from synccore.model import Timing
from synccore.spec import Spec


def _bits(n: int) -> int:
    return max(1, (n - 1).bit_length())


def counter_bits(spec: Spec) -> tuple[int, int]:
    """The widths of the two counters: pixel groups per line, lines per frame."""
    t = Timing(spec)
    return _bits(spec.horizontal.total // t.ppc), _bits(spec.vertical.total)


def output_bits(spec: Spec) -> int:
    """The core's output bits: x, y and the seven single-bit outputs."""
    return _bits(spec.horizontal.active) + _bits(spec.vertical.active) + 7


def ff_bound(spec: Spec) -> int:
    """Flip-flop lower bound: the two counters plus one per registered output bit."""
    return sum(counter_bits(spec)) + output_bits(spec)


def textbook_verilog(spec: Spec, name: str = "textbook") -> str:
    """The textbook counter of ``spec`` (clock ``clk``, synchronous reset ``rst``)."""
    ppc = Timing(spec).ppc
    h, v = spec.horizontal, spec.vertical
    hw, vw = counter_bits(spec)
    xw, yw = _bits(h.active), _bits(v.active)
    shift = (ppc - 1).bit_length()
    hs0, hs1 = (h.active + h.front_porch) // ppc, (h.active + h.front_porch + h.sync) // ppc
    vs0, vs1 = v.active + v.front_porch, v.active + v.front_porch + v.sync
    hpol = "" if h.sync_polarity == "positive" else "~"
    vpol = "" if v.sync_polarity == "positive" else "~"
    ha = h.active // ppc
    return f"""module {name} (input wire clk, input wire rst,
  output wire hsync, output wire vsync, output wire de, output wire hblank, output wire vblank,
  output wire [{xw - 1}:0] x, output wire [{yw - 1}:0] y,
  output wire line_start, output wire frame_start);
  reg [{hw - 1}:0] hc;
  reg [{vw - 1}:0] vc;
  always @(posedge clk) begin
    if (rst) begin hc <= 0; vc <= 0; end
    else if (hc == {h.total // ppc - 1}) begin
      hc <= 0;
      vc <= (vc == {v.total - 1}) ? {vw}'d0 : vc + 1'b1;
    end else hc <= hc + 1'b1;
  end
  assign hblank = hc >= {ha};
  assign vblank = vc >= {v.active};
  assign de = !hblank && !vblank;
  assign hsync = {hpol}(hc >= {hs0} && hc < {hs1});
  assign vsync = {vpol}(vc >= {vs0} && vc < {vs1});
  wire [{xw + shift - 1}:0] xs = hc << {shift};
  assign x = de ? xs[{xw - 1}:0] : {xw}'d0;
  assign y = de ? vc[{yw - 1}:0] : {yw}'d0;
  assign line_start = de && hc == 0;
  assign frame_start = line_start && vc == 0;
endmodule
"""
