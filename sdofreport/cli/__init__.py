"""The command line: every click command of ``sdofreport`` and its entry point.

One module per group of commands, each parsing its options, calling one library
function and reporting: :mod:`~sdofreport.cli.app` (the root group, ``build``,
``spectrum`` and :func:`main`), :mod:`~sdofreport.cli.archive` (``verify``, ``compare``,
``pack``, ``register``), :mod:`~sdofreport.cli.new_and_schema` (``new``, ``schema``),
:mod:`~sdofreport.cli.synthesize` (``synthesize``), with the options every command
spells the same way in :mod:`~sdofreport.cli.options` and the ``spectrum`` job in
:mod:`~sdofreport.cli.spectrum_report`.
"""

from sdofreport.cli.app import build_command, cli, main, spectrum_command

__all__ = ["build_command", "cli", "main", "spectrum_command"]
