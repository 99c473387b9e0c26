"""Identifier rules shared by the validator and the emitters.

A core's name and port names must be legal in Verilog and in VHDL at once,
and must not clash with the names used inside the emitted core.  VHDL is
case-insensitive, so every clash check folds case.
"""

from __future__ import annotations

import re

# IEEE 1364-2005 keywords, plus IEEE 1800-2017 (SystemVerilog) keywords: many
# tools read .v files in SystemVerilog mode, so those words are refused too.
VERILOG_KEYWORDS = frozenset(
    """
    always and assign automatic begin buf bufif0 bufif1 case casex casez cell cmos config
    deassign default defparam design disable edge else end endcase endconfig endfunction
    endgenerate endmodule endprimitive endspecify endtable endtask event for force forever
    fork function generate genvar highz0 highz1 if ifnone incdir include initial inout input
    instance integer join large liblist library localparam macromodule medium module nand
    negedge nmos nor noshowcancelled not notif0 notif1 or output parameter pmos posedge
    primitive pull0 pull1 pulldown pullup pulsestyle_ondetect pulsestyle_onevent rcmos real
    realtime reg release repeat rnmos rpmos rtran rtranif0 rtranif1 scalared showcancelled
    signed small specify specparam strong0 strong1 supply0 supply1 table task time tran
    tranif0 tranif1 tri tri0 tri1 triand trior trireg unsigned use uwire vectored wait wand
    weak0 weak1 while wire wor xnor xor
    accept_on alias always_comb always_ff always_latch assert assume before bind bins
    binsof bit break byte chandle checker class clocking const constraint context continue
    cover covergroup coverpoint cross dist do endchecker endclass endclocking endgroup
    endinterface endpackage endprogram endproperty endsequence enum eventually expect
    export extends extern final first_match foreach forkjoin global iff ignore_bins
    illegal_bins implements implies import inside int interconnect interface intersect
    join_any join_none let local logic longint matches modport nettype new nexttime null
    package packed priority program property protected pure rand randc randcase
    randsequence ref reject_on restrict return s_always s_eventually s_nexttime s_until
    s_until_with sequence shortint shortreal soft solve static string strong struct super
    sync_accept_on sync_reject_on tagged this throughout timeprecision timeunit type typedef
    union unique unique0 until until_with untyped var virtual void wait_order weak
    wildcard with within
    """.split()
)

# IEEE 1076-2008 reserved words (a superset of the -93 list).
VHDL_KEYWORDS = frozenset(
    """
    abs access after alias all and architecture array assert assume assume_guarantee
    attribute begin block body buffer bus case component configuration constant context
    cover default disconnect downto else elsif end entity exit fairness file for force
    function generate generic group guarded if impure in inertial inout is label library
    linkage literal loop map mod nand new next nor not null of on open or others out
    package parameter port postponed procedure process property protected pure range record
    register reject release rem report restrict restrict_guarantee return rol ror select
    sequence severity shared signal sla sll sra srl strong subtype then to transport type
    unaffected units until use variable vmode vprop vunit wait when while with xnor xor
    """.split()
)

# Names the emitted cores use inside themselves (constants, signals, processes,
# libraries).  A core or port named like one of them would clash.
INTERNAL_NAMES = frozenset(
    name.lower()
    for name in """
    ieee std_logic_1164 numeric_std std_logic std_logic_vector unsigned rtl
    h_pos v_pos h_lead v_lead advance
    h_active h_sync_start h_sync_end h_last v_active v_sync_start v_sync_end v_last
    h_lead_reset v_lead_reset v_sync_at_h x_shift
    sync_on sync_off h_sync_on h_sync_off v_sync_on v_sync_off
    hsync_q vsync_q de_q hblank_q vblank_q x_q y_q line_start_q frame_start_q
    timing pixels_per_clock scale
    """.split()
)

_COMMON_IDENTIFIER = re.compile(r"[A-Za-z](?:_?[A-Za-z0-9])*\Z")


MAX_NAME_CHARS = 100
"""Longest module or port name: a core's files are named after it, plus suffixes."""


def identifier_problem(name: str) -> str | None:
    """Why ``name`` cannot name a module, entity or port in both languages, or None if it can."""
    if len(name) > MAX_NAME_CHARS:
        return (f"must be at most {MAX_NAME_CHARS} characters (it names files too, and file systems "
                "limit a file name's length)")  # fmt: skip
    if not _COMMON_IDENTIFIER.match(name):
        return (
            "must start with a letter and hold only letters, digits and single underscores "
            "(not at the end), to be legal in both Verilog and VHDL"
        )
    if name in VERILOG_KEYWORDS:
        return "is a Verilog keyword"
    if name.lower() in VHDL_KEYWORDS:
        return "is a VHDL reserved word"
    if name.lower() in INTERNAL_NAMES:
        return "is a name used inside the generated core"
    return None
