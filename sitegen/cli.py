"""The ``sitegen`` command: arguments in, findings and an exit code out.

Exit codes: 0 no error; 1 errors found (or a command's own failure such
as a reaction that cannot be balanced); 2 usage errors, unreadable paths
or a refused output folder. Users never see a traceback.
"""

from __future__ import annotations

__all__ = ["leave", "main", "run"]

import argparse
import datetime as _dt
import json
import os
import sys
from collections.abc import Sequence
from pathlib import Path
from typing import Any, NoReturn, TextIO

from .errors import Finding, finding_to_json, format_finding

PROG = "sitegen"


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # type: ignore[override]
        self.print_usage(sys.stderr)
        self.exit(2, f"{self.prog}: error: {message}\n")


_CACHE_HELP = (
    "where results are kept between builds (default: $SITEGEN_CACHE, else .sitegen-cache/"
    " beside the source folder)"
)


def _parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog=PROG,
        description="Check and publish a lab's collection of redox-titration methods.",
    )
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    c = sub.add_parser("check", help="validate records and run every checker rule")
    c.add_argument("paths", nargs="*", type=Path, default=[Path("methods")], metavar="PATHS")
    c.add_argument("--format", choices=("text", "json"), default="text")
    c.add_argument("--strict", action="store_true", help="warnings fail too")
    c.add_argument("--profile", default=None, help="named rule set: default, strict, draft")
    c.add_argument(
        "--today",
        type=_dt.date.fromisoformat,
        default=None,
        help="date to compare review deadlines with (YYYY-MM-DD)",
    )

    b = sub.add_parser("build", help="check, then write the site")
    b.add_argument("source", nargs="?", type=Path, default=Path("methods"), metavar="SOURCE")
    b.add_argument("--out", type=Path, default=Path("output"))
    b.add_argument("--jobs", type=int, default=None, help="worker processes (default: CPUs)")
    b.add_argument("--strict", action="store_true", help="warnings fail too")
    b.add_argument(
        "--keep-going",
        action="store_true",
        help="publish the methods that pass and list the failing ones",
    )
    b.add_argument("--theme", type=Path, default=None, help="a theme folder of your own")
    b.add_argument("--today", type=_dt.date.fromisoformat, default=None)
    b.add_argument("--cache-dir", type=Path, default=None, help=_CACHE_HELP)

    s = sub.add_parser("schema", help="write the JSON Schema of the record format")
    s.add_argument("--out", type=Path, default=None, help="file to write (default: stdout)")
    s.add_argument(
        "--kind", choices=("method", "reagent", "indicator", "site", "all"), default="all"
    )

    bal = sub.add_parser(
        "balance", help="balance a redox reaction by the half-reaction method", add_help=False
    )
    bal.add_argument("rest", nargs=argparse.REMAINDER)

    sub.add_parser("rules", help="list the checker rules and what each checks")

    sv = sub.add_parser("serve", help="build, serve on 127.0.0.1 and rebuild on change")
    sv.add_argument("source", nargs="?", type=Path, default=Path("methods"))
    sv.add_argument("--out", type=Path, default=Path("output"))
    sv.add_argument("--host", default="127.0.0.1")
    sv.add_argument("--port", type=int, default=8000)
    sv.add_argument("--theme", type=Path, default=None, help="a theme folder of your own")
    sv.add_argument("--jobs", type=int, default=None, help="worker processes (default: CPUs)")
    sv.add_argument("--cache-dir", type=Path, default=None, help=_CACHE_HELP)
    return p


def _settings(args: argparse.Namespace, strict: bool) -> Any:
    from .check.registry import Settings

    kw: dict[str, Any] = {"strict": strict}
    if getattr(args, "today", None) is not None:
        kw["today"] = args.today
    else:
        from .clock import build_date

        kw["today"] = build_date()
    return Settings(**kw)


def _print_findings(findings: Sequence[Finding], sources: dict[str, Any], out: TextIO) -> None:
    for f in findings:
        src = sources.get(f.span.path)
        line = src.line(f.span.line) if src is not None else None
        print(format_finding(f, line), file=out)


def _cmd_check(args: argparse.Namespace, out: TextIO, err: TextIO) -> int:
    from .build.run import check_paths

    enabled = None
    strict = args.strict
    if args.profile is not None:
        from .check.profiles import profile_rules

        try:
            enabled, pstrict = profile_rules(args.profile)
        except KeyError as exc:
            print(f"{PROG} check: error: {exc.args[0]}", file=err)
            return 2
        strict = strict or pstrict
    try:
        result = check_paths(args.paths, _settings(args, strict), enabled)
    except (FileNotFoundError, NotADirectoryError, PermissionError) as exc:
        print(f"{PROG} check: error: {exc}", file=err)
        return 2
    findings = result.findings
    if args.format == "json":
        json.dump([finding_to_json(f) for f in findings], out, indent=2, ensure_ascii=False)
        out.write("\n")
    else:
        _print_findings(findings, result.collection.sources, out)
        n_err, n_warn = len(result.errors), len(result.warnings)
        sel = result.collection.selected
        n_methods = len(sel) if sel is not None else len(result.collection.methods)
        print(
            f"{n_methods} method(s) checked: {n_err} error(s), {n_warn} warning(s)",
            file=err,
        )
    return 1 if result.errors else 0


def _cmd_build(args: argparse.Namespace, out: TextIO, err: TextIO) -> int:
    from .build.write import OutputRefused

    try:
        from .build.engine import build  # parallel, cached engine when available
    except ImportError:
        build = None
    settings = _settings(args, args.strict)
    try:
        if build is not None:
            report = build(
                args.source,
                args.out,
                settings=settings,
                keep_going=args.keep_going,
                theme=args.theme,
                jobs=args.jobs,
                progress=err,
                cache_dir=args.cache_dir,
            )
        else:
            from .build.run import build_site

            report = build_site(
                args.source,
                args.out,
                settings=settings,
                keep_going=args.keep_going,
                theme=args.theme,
            )
    except OutputRefused as exc:
        print(f"{PROG} build: error: {exc}", file=err)
        return 2
    except FileNotFoundError as exc:
        print(f"{PROG} build: error: {exc}", file=err)
        return 2
    result = report.check
    _print_findings(result.findings, result.collection.sources, err)
    if not report.written:
        print(
            f"{PROG} build: not published: {len(result.errors)} error(s); the previous site in"
            f" {args.out} is unchanged",
            file=err,
        )
        return 1
    total = sum(report.stage_seconds.values())
    print(
        f"{PROG} build: {report.methods_built} method(s) built, {report.methods_cached} from"
        f" cache, {len(report.excluded)} left out, {len(result.warnings)} warning(s),"
        f" {len(result.errors)} error(s), {report.files} files in {args.out} ({total:.2f} s)",
        file=err,
    )
    return 0


def _cmd_schema(args: argparse.Namespace, out: TextIO, err: TextIO) -> int:
    from .schema import schema_json

    text = schema_json(args.kind)
    if args.out is None:
        out.write(text)
    else:
        try:
            args.out.parent.mkdir(parents=True, exist_ok=True)
            args.out.write_text(text, encoding="utf-8")
        except OSError as exc:
            print(f"{PROG} schema: error: cannot write {args.out}: {exc}", file=err)
            return 2
    return 0


def _cmd_rules(args: argparse.Namespace, out: TextIO, err: TextIO) -> int:
    from .check.run import RULES

    for info in RULES.values():
        print(f"{info.id} ({info.scope}): {info.doc}", file=out)
    return 0


def main(
    argv: Sequence[str] | None = None, out: TextIO | None = None, err: TextIO | None = None
) -> int:
    """Run the command line; returns the exit code."""
    out = out or sys.stdout
    err = err or sys.stderr
    argv = list(sys.argv[1:] if argv is None else argv)
    if argv[:1] == ["balance"]:
        from .cli_balance import run as balance_run

        return balance_run(argv[1:], out=out, err=err)
    parser = _parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:
        return int(exc.code or 0)
    if args.command is None:
        parser.print_help(out)
        return 2
    handlers = {
        "check": _cmd_check,
        "build": _cmd_build,
        "schema": _cmd_schema,
        "rules": _cmd_rules,
    }
    if args.command == "serve":
        from .serve import serve

        return serve(args, out, err)
    try:
        return handlers[args.command](args, out, err)
    except KeyboardInterrupt:
        print(f"{PROG}: interrupted", file=err)
        return 130
    except Exception as exc:  # a bug in sitegen, not in the records
        if os.environ.get("SITEGEN_DEBUG"):
            raise
        print(
            f"{PROG}: internal error: {type(exc).__name__}: {exc}\n"
            f"{PROG}: this is a bug in sitegen, not in your records; set SITEGEN_DEBUG=1 to"
            " see the traceback and report it",
            file=err,
        )
        return 1


def leave(code: int) -> NoReturn:
    """End the process with ``code``: flush the standard streams, run the
    exit handlers, and skip freeing every object one by one, which for a
    large collection takes longer than a small rebuild's writing (the
    operating system takes the memory back at once)."""
    import atexit

    try:
        for stream in (sys.stdout, sys.stderr):
            if stream is not None:
                stream.flush()
        atexit._run_exitfuncs()
    finally:
        os._exit(code)


def run() -> NoReturn:
    """The ``sitegen`` command: :func:`main`, then :func:`leave`."""
    leave(main())


if __name__ == "__main__":
    run()
