"""synccore: display timing cores for FPGAs.

A YAML timing description is read into a :class:`Spec` (:func:`load`,
:func:`loads`), derived into a :class:`Timing` (:func:`timing`; the reference
model every test checks against), written as Verilog-2001 and VHDL cores with
optional benches, test-pattern design and clock wrapper (:func:`write`,
:func:`plan_clock`, :func:`adjusted_spec` when the board cannot make the clock;
:func:`plan_modes` for several modes from one board clock),
measured in simulation (:func:`verify`; :func:`verify_modes` for a multi-mode spec) and
proved for all time (:func:`prove`).
Standard timings come from :func:`find_mode`.

This package exports the curated API of :mod:`synccore.api` and nothing else;
docs/api.md describes it with a worked example.
"""

from synccore.api import (
    Axis,
    ClockPlan,
    CoreOptions,
    DacDesign,
    LinkPlan,
    Location,
    Mode,
    ModesPlan,
    ModesReport,
    Outputs,
    Problem,
    ProofResult,
    Report,
    Spec,
    SpecError,
    Timing,
    ToolError,
    __version__,
    adjusted_spec,
    adjusted_text,
    design_dac,
    find_mode,
    fit,
    json_schema,
    load,
    loads,
    plan_clock,
    plan_dvi_link,
    plan_modes,
    prove,
    render_verilog,
    render_vhdl,
    timing,
    verify,
    verify_modes,
    write,
)

__all__ = [
    "Axis",
    "ClockPlan",
    "CoreOptions",
    "DacDesign",
    "LinkPlan",
    "Location",
    "Mode",
    "ModesPlan",
    "ModesReport",
    "Outputs",
    "Problem",
    "ProofResult",
    "Report",
    "Spec",
    "SpecError",
    "Timing",
    "ToolError",
    "__version__",
    "adjusted_spec",
    "adjusted_text",
    "design_dac",
    "find_mode",
    "fit",
    "json_schema",
    "load",
    "loads",
    "plan_clock",
    "plan_dvi_link",
    "plan_modes",
    "prove",
    "render_verilog",
    "render_vhdl",
    "timing",
    "verify",
    "verify_modes",
    "write",
]
