"""``sitegen balance``: balance a skeleton redox equation from the command line.

This is a thin shell around :func:`sitegen.chem.balance.balance`; it parses
arguments, prints and returns an exit code (0 ok, 1 chemistry error, 2 usage
error). All chemistry lives in :mod:`sitegen.chem`.
"""

from __future__ import annotations

__all__ = ["build_parser", "result_json", "run"]

import argparse
import json
import sys
from fractions import Fraction
from typing import TextIO

from sitegen.chem.balance import Balanced, balance
from sitegen.chem.errors import ChemError

PROG = "sitegen balance"


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of ``sitegen balance``."""
    p = argparse.ArgumentParser(
        prog=PROG,
        description="Balance a skeleton redox equation by the half-reaction method.",
    )
    p.add_argument("skeleton", help='skeleton equation, e.g. "MnO4- + Fe^2+ -> Mn^2+ + Fe^3+"')
    p.add_argument(
        "--medium",
        choices=("acidic", "basic"),
        default=None,
        help="add H+/H2O (acidic) or OH-/H2O (basic); default: use only the written species",
    )
    p.add_argument(
        "--format",
        choices=("text", "json"),
        default="text",
        dest="fmt",
        help="output format (default: text)",
    )
    return p


def _number(q: Fraction) -> int | str:
    return q.numerator if q.denominator == 1 else f"{q.numerator}/{q.denominator}"


def result_json(b: Balanced) -> dict[str, object]:
    """The JSON-ready mapping printed by ``--format json``."""
    return {
        "equation": b.equation.canonical,
        "reactants": {t.species.canonical: _number(t.coeff) for t in b.equation.left},
        "products": {t.species.canonical: _number(t.coeff) for t in b.equation.right},
        "electrons": _number(b.electrons),
        "medium": b.medium,
        "halves": [{"reaction": h.reaction.canonical, "n": h.n, "kind": h.kind} for h in b.halves],
    }


def _text(b: Balanced) -> str:
    lines = [b.equation.canonical]
    for h in b.halves:
        lines.append(f"  {h.kind} (n = {h.n}): {h.reaction.canonical}")
    lines.append(f"electrons transferred: {_number(b.electrons)}")
    return "\n".join(lines) + "\n"


def run(argv: list[str], out: TextIO | None = None, err: TextIO | None = None) -> int:
    """Run ``sitegen balance`` with ``argv`` (arguments after the subcommand).

    Returns:
        0 on success, 1 when the equation cannot be parsed or balanced,
        2 on a usage error.
    """
    out = sys.stdout if out is None else out
    err = sys.stderr if err is None else err
    parser = build_parser()
    try:
        # argparse writes --help to sys.stdout and usage errors to sys.stderr.
        saved = sys.stdout, sys.stderr
        sys.stdout, sys.stderr = out, err
        try:
            args = parser.parse_args(argv)
        finally:
            sys.stdout, sys.stderr = saved
    except SystemExit as e:
        return int(e.code) if isinstance(e.code, int) else 2
    try:
        b = balance(args.skeleton, args.medium)
    except ChemError as e:
        err.write(f"{PROG}: error: {e}\n")
        return 1
    if args.fmt == "json":
        out.write(json.dumps(result_json(b), ensure_ascii=False, indent=2) + "\n")
    else:
        out.write(_text(b))
    return 0
