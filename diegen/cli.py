"""Command line: parse arguments, call :mod:`diegen.api`, print, set the exit code.

Exit codes: 0 success, 1 a build finished but some pieces failed (``check``: some pieces' dies would be
refused), 2 bad input
(spec, airfoil, impossible geometry), 3 an internal error (a bug: please report).
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from collections.abc import Sequence
from pathlib import Path

from diegen import __version__
from diegen.errors import DiegenError, OutputError, SpecError

EXIT_OK, EXIT_FAILED_PIECES, EXIT_BAD_INPUT, EXIT_INTERNAL = 0, 1, 2, 3


def _jobs(text: str) -> int:
    """A worker count: a whole number of at least 1."""
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(
            f"expected a whole number of worker processes (1 or more), found {text!r}") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected 1 or more worker processes, found {value}; leave -j out to use "
                                         "one per core")
    return value


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="diegen",
        description="Design form blocks (dies), flat blanks and forming reports for rubber-pad pressed ribs.",
        epilog="Safety: a shop press stores a great deal of energy. Follow the aircraft designer's drawings, "
               "the alloy's heat-treatment specification and local codes and licensed practice.",
    )
    parser.add_argument("--version", action="version", version=f"diegen {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", required=True)

    check = sub.add_parser("check", help="validate a spec and print the geometry and forming report (no solids)")
    check.add_argument("spec", type=Path, help="rib, wing, part or set spec (YAML)")
    check.add_argument("--json", action="store_true", help="print one JSON document instead of the text report")
    check.add_argument("--plot", action="store_true", help="also write a PNG plot of each piece")
    check.add_argument("-o", "--out", type=Path, default=Path("out"), help="output folder for --plot (default: out)")

    build = sub.add_parser("build", help="write dies (STEP/STL), blanks (DXF/SVG/PDF), reports and shop sheets")
    build.add_argument("spec", type=Path, nargs="+",
                       help="rib, wing, part or set spec (YAML); several are each read before any is built")
    build.add_argument("-o", "--out", type=Path, default=Path("out"), help="output folder (default: out)")
    build.add_argument("--force", action="store_true", help="rebuild pieces whose inputs did not change")
    build.add_argument("-j", "--jobs", type=_jobs, default=None, help="parallel worker processes (default: cores)")
    build.add_argument("-q", "--quiet", action="store_true", help="no progress bar")

    diff = sub.add_parser("diff", help="say which pieces two specs would change, without building")
    diff.add_argument("old", type=Path)
    diff.add_argument("new", type=Path)

    new = sub.add_parser("new", help="write a commented starter spec")
    new.add_argument("kind", choices=("rib", "wing", "part"))
    new.add_argument("path", type=Path)
    new.add_argument("--units", choices=("in", "mm"), default="in",
                     help="the unit of the starter's bare numbers (default: in)")
    new.add_argument("--force", action="store_true", help="overwrite an existing file")

    sub.add_parser("materials", help="list sheet alloys and die materials with their sources")
    return parser


def _print_problems(error: DiegenError) -> None:
    if isinstance(error, SpecError):
        count = len(error.problems)
        for problem in error.problems:
            print(f"error: {problem}", file=sys.stderr)
        print(f"diegen: {count} problem{'s' if count != 1 else ''} in the spec; nothing was written", file=sys.stderr)
    else:
        print(f"error: {error}", file=sys.stderr)
        if not isinstance(error, OutputError):
            print("diegen: the spec cannot be made as it stands; nothing was written", file=sys.stderr)


def _run(args: argparse.Namespace) -> int:
    from diegen import api

    if args.command == "materials":
        from diegen import materials

        print(materials.catalogue_text())
        return EXIT_OK
    if args.command == "new":
        path = api.write_starter(args.kind, args.path, overwrite=args.force, units=args.units)
        print(f"wrote {path}; next: diegen check {path}")
        return EXIT_OK
    if args.command == "check":
        spec = api.load(args.spec)
        analysis = api.analyse(spec)
        if args.json:
            print(json.dumps(api.report_json(analysis), indent=2))
        else:
            print(api.report_text(analysis))
        if args.plot:
            for path in _write_plots(analysis, args.out):
                print(f"plot: {path}")
        return EXIT_FAILED_PIECES if api.refused_pieces(analysis) else EXIT_OK
    if args.command == "diff":
        print(api.diff_text(api.load(args.old), api.load(args.new)))
        return EXIT_OK
    if args.command == "build":
        specs = [api.load(path) for path in args.spec]  # every spec valid before anything is written
        show = not args.quiet and sys.stderr.isatty()
        failed = False
        for spec in specs:
            result = api.build(spec, args.out, force=args.force, jobs=args.jobs, progress=show)
            print(result.summary())
            failed = failed or bool(result.failed)
        return EXIT_FAILED_PIECES if failed else EXIT_OK
    raise AssertionError(args.command)


def _write_plots(analysis, out: Path) -> list[Path]:
    """The plots of ``check --plot``, kept inside ``out/<spec id>`` as a build's files are."""
    from diegen import api
    from diegen.fileio import confined_to
    from diegen.pipeline.folder import check_output_folder
    from diegen.pipeline.jobs import rib_analyses
    from diegen.pipeline.lock import BuildLock

    folder = out / analysis.spec.id
    check_output_folder(out, analysis.spec.id, [p.piece.part_id for r in rib_analyses(analysis) for p in r.pieces])
    with BuildLock(folder), confined_to(folder):
        return api.write_plots(analysis, out)


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``diegen`` console script."""
    args = _parser().parse_args(argv)
    try:
        return _run(args)
    except DiegenError as error:
        _print_problems(error)
        return EXIT_BAD_INPUT
    except BrokenPipeError:  # output piped into a pager or head that closed early
        sys.stderr.close()
        return EXIT_OK
    except KeyboardInterrupt:
        print("diegen: interrupted; finished files are complete, nothing partial was left", file=sys.stderr)
        return 130
    except Exception as error:  # a bug: say so plainly, no traceback unless asked for
        if os.environ.get("DIEGEN_DEBUG"):
            raise
        print(f"diegen: internal error ({type(error).__name__}: {error}). This is a bug in diegen; "
              "run again with DIEGEN_DEBUG=1 for details.", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":
    sys.exit(main())
