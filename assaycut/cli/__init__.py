"""Command line of assaycut: a thin shell over the readers, the core and the report writers.

Each command family is a Typer app of its own (:mod:`.yields_cmd`, :mod:`.convert_cmd`, :mod:`.compare_cmd`,
:mod:`.blend_cmd`, :mod:`.cutpoints_cmd`, :mod:`.calibrate_cmd`, :mod:`.pseudo_cmd`, :mod:`.explore_cmd`), composed here with ``add_typer``; the families
share :mod:`.common` and import neither each other nor this module.  :mod:`.batch_runner` runs the yield job
over many files.
"""

from __future__ import annotations

import signal
import sys

import typer
from typer.core import TyperGroup

from . import (blend_cmd, calibrate_cmd, compare_cmd, convert_cmd, cutpoints_cmd, explore_cmd, pseudo_cmd,
               yields_cmd)
from .common import TdMethod, error_line, interrupted, stop_now


class _OneLineErrors(TyperGroup):
    """Command group whose usage errors (bad option, missing argument...) are one line on stderr, exit 2."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        # the base class of click's usage errors, whether typer vendors click or depends on it
        ClickException = next(c for c in typer.BadParameter.__mro__ if c.__name__ == "ClickException")
        try:
            rv = super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        except ClickException as exc:
            where = f" (see '{exc.ctx.command_path} --help')" if getattr(exc, "ctx", None) else ""
            error_line(" ".join(exc.format_message().split()) + where)
            sys.exit(exc.exit_code)
        except typer.Abort:
            error_line("aborted")
            sys.exit(1)
        sys.exit(rv if isinstance(rv, int) else 0)


def _plain_arguments() -> None:
    """Arguments with a metavar of their own (ASSAY, FILE) are shown by it alone in --help, without typer's
    type tag ("ASSAY <str>"); a typer without this help renderer is left as it is."""
    import typer.core as tc

    arg = getattr(tc, "TyperArgument", None)
    shown = getattr(arg, "display_type_rich", None)
    if shown is None:
        return

    def plain(self, ctx):
        return "" if self.metavar else shown(self, ctx)

    arg.display_type_rich = plain


_plain_arguments()

app = typer.Typer(
    cls=_OneLineErrors,
    name="assaycut",
    help="Cut crude-oil assays at your refinery's TBP cut points: yields, cut qualities and limit checks, "
         "distillation conversions and reports. Results are estimates for screening and planning, not "
         "measured properties. With no command, runs the yield report on the demo assay.",
    add_completion=False,
    context_settings={"help_option_names": ["-h", "--help"]},  # inherited by every command
    no_args_is_help=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)
for _family in (yields_cmd, convert_cmd, compare_cmd, blend_cmd, cutpoints_cmd, calibrate_cmd, pseudo_cmd,
                explore_cmd):
    app.add_typer(_family.app)


def _show_version(value: bool) -> None:
    if value:
        from .. import __version__

        typer.echo(f"assaycut {__version__}")
        raise typer.Exit()


@app.callback(invoke_without_command=True)
def _root(ctx: typer.Context,
          version: bool = typer.Option(False, "--version", help="Print the version and exit.",
                                       callback=_show_version, is_eager=True)) -> None:
    """Bare `assaycut` runs the yield report on the demo assay."""
    if ctx.invoked_subcommand is None:
        ctx.invoke(yields_cmd.yields, assays=None, cuts=None, limits=None, out=None, json_out=False, end=None,
                   api=None, sg=None, density=None, sulfur=None, method=TdMethod.daubert_1994,
                   summary_only=False, overlap=None, uncertainty=0, sigma_temp=2.0, sigma_pct=0.3,
                   sigma_sg=0.0005, sigma_sulfur=3.0)


def _on_sigterm(signum, frame):  # pragma: no cover - exercised by a subprocess test
    stop_now("terminated", 143)


def _unraisable(hook):
    """A ``sys.unraisablehook`` that does not let Ctrl-C be lost.

    Python raises KeyboardInterrupt wherever the main thread is when Ctrl-C arrives; inside a weak-reference
    callback or a ``__del__`` (matplotlib runs many while drawing the plots) the exception cannot propagate,
    is printed as "Exception ignored in ..." with a traceback, and the run would go on writing reports.  This
    hook stops the run there instead, as the normal Ctrl-C path does (exit 130, no partial report); other
    unraisable exceptions go to the previous hook.
    """

    def unraisable(info):  # pragma: no cover - exercised by the interrupt tests
        if info.exc_type is not None and issubclass(info.exc_type, KeyboardInterrupt):
            interrupted()
        hook(info)

    return unraisable


def main() -> None:
    """Console entry point."""
    signal.signal(signal.SIGTERM, _on_sigterm)
    sys.unraisablehook = _unraisable(sys.unraisablehook)
    try:
        app()
    except KeyboardInterrupt:
        interrupted()
