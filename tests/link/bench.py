"""An Icarus bench for the serialisers: random words in, both edges of every pin sampled out.

The bench makes clk_serial (10 ns) and, in phase with it, clk_pixel (5 x ppc times
slower); on iCE40 a ce of one cycle in 5 x ppc instead. It releases rst on a word
clock edge, then presents a new random word on every lane at each word edge and logs
it ("P <half-period index> <w0> <w1> <w2>"), and logs every pin 2 ns after each edge of
clk_serial ("S <half-period index> <p0 p1 p2 pclk> <n0 n1 n2 nclk>"). Half-period k
starts at 5 k ns.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from tests.hdl import run

HALF_NS = 5

_BENCH = """\
`timescale 1ns / 1ns
`default_nettype none
module bench;
    localparam integer N = {n};
    reg clk_serial = 1'b1;
    reg clk_pixel = 1'b1;
    always #5 clk_serial = ~clk_serial;
    always #{pixel_half} clk_pixel = ~clk_pixel;
    integer phase = 0;
    always @(posedge clk_serial) phase <= (phase == N - 1) ? 0 : phase + 1;
    wire ce = (phase == 0);
    reg rst = 1'b1;
    integer words = 0, seed = {seed}, f;
    reg [{hi}:0] w0 = 0, w1 = 0, w2 = 0, n0, n1, n2;
    wire [2:0] dp, dn;
    wire cp, cn;
    always @(posedge {word_clock}) if ({word_enable}) begin
        words <= words + 1;
        if (words == 3) rst <= 1'b0;
        if (!rst) begin
            n0 = {{$random(seed), $random(seed)}};
            n1 = {{$random(seed), $random(seed)}};
            n2 = {{$random(seed), $random(seed)}};
            w0 <= n0; w1 <= n1; w2 <= n2;
            $fdisplay(f, "P %0d %h %h %h", $time / 5, n0, n1, n2);
        end
        if (words == {words}) begin $fclose(f); $finish; end
    end
    always @(clk_serial) begin
        #2 $fdisplay(f, "S %0d %b%b%b%b %b%b%b%b", ($time - 2) / 5,
                     dp[0], dp[1], dp[2], cp, dn[0], dn[1], dn[2], cn);
    end
    initial f = $fopen("samples.txt", "w");
    dvi_serialiser dut (
        {clock_ports}
        .rst (rst), .tmds0 (w0), .tmds1 (w1), .tmds2 (w2),
        .tmds_clk_p (cp), .tmds_clk_n (cn), .tmds_data_p (dp), .tmds_data_n (dn)
    );
endmodule
"""


@dataclass(frozen=True)
class Capture:
    words: list[tuple[int, tuple[int, int, int]]]  # (half-period index, three words)
    p: dict[int, str]  # half-period index -> "d0 d1 d2 clk" bits of the _p pins
    n: dict[int, str]


def bench_text(*, ppc: int, ice40: bool, words: int = 40, seed: int = 11) -> str:
    n = 5 * ppc
    clock_ports = ".clk_serial (clk_serial), .ce (ce)," if ice40 else \
        ".clk_pixel (clk_pixel), .clk_serial (clk_serial),"  # fmt: skip
    return _BENCH.format(
        n=n, pixel_half=HALF_NS * n, seed=seed, hi=10 * ppc - 1, words=words,
        word_clock="clk_serial" if ice40 else "clk_pixel", word_enable="ce" if ice40 else "1",
        clock_ports=clock_ports,
    )  # fmt: skip


def run_bench(folder: Path, sources: list[str], *, ppc: int, ice40: bool) -> Capture:
    (folder / "bench.v").write_text(bench_text(ppc=ppc, ice40=ice40))
    run(["iverilog", "-g2001", "-o", "bench.vvp", "-s", "bench", "bench.v", *sources], folder)
    run(["vvp", "-n", "bench.vvp"], folder)
    words, p, n = [], {}, {}
    for line in (folder / "samples.txt").read_text().splitlines():
        kind, index, *rest = line.split()
        if kind == "P":
            words.append((int(index), (int(rest[0], 16), int(rest[1], 16), int(rest[2], 16))))
        else:
            p[int(index)], n[int(index)] = rest[0], rest[1]
    return Capture(words, p, n)
