"""The command line: one click group; each command lives in its own module of this package.

Thin: a command parses its options, calls the API (:mod:`synccore.api`) or a stage,
and prints the result.  Bad input is one line per problem and exit status 2.
"""

from __future__ import annotations

import click

from synccore._version import __version__
from synccore.cli.build import build
from synccore.cli.clock import clock
from synccore.cli.dac import dac_command
from synccore.cli.edid import edid_command
from synccore.cli.fit import fit_command
from synccore.cli.modes import modes_command, new_command
from synccore.cli.prove import prove_command
from synccore.cli.show import schema, show
from synccore.cli.verify import verify_command
from synccore.cli.view import view_command


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="synccore")
def main() -> None:
    """Display timing cores for FPGAs: YAML timing in, Verilog and VHDL sync generators out."""


for command in (build, show, schema, modes_command, new_command, verify_command, clock,
                view_command, fit_command, prove_command, edid_command, dac_command):  # fmt: skip
    main.add_command(command)
