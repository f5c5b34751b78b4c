"""Tests for the ``sitegen balance`` shim (sitegen/cli_balance.py)."""

import io
import json

from sitegen.cli_balance import run


def _run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = run(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def test_text_output():
    code, out, err = _run("MnO4- + Fe^2+ -> Mn^2+ + Fe^3+", "--medium", "acidic")
    assert code == 0
    assert err == ""
    lines = out.splitlines()
    # Skoog, permanganate/iron(II) (from memory).
    assert lines[0] == "MnO4- + 5 Fe^2+ + 8 H+ -> Mn^2+ + 5 Fe^3+ + 4 H2O"
    assert "reduction (n = 5): MnO4- + 8 H+ + 5 e- = Mn^2+ + 4 H2O" in out
    assert "oxidation (n = 1): Fe^2+ = Fe^3+ + e-" in out
    assert lines[-1] == "electrons transferred: 5"


def test_json_output():
    code, out, _ = _run(
        "Cr2O7^2- + Fe^2+ -> Cr^3+ + Fe^3+", "--medium", "acidic", "--format", "json"
    )
    assert code == 0
    data = json.loads(out)
    # Skoog, dichromate/iron(II) (from memory).
    assert data["reactants"] == {"Cr2O7^2-": 1, "Fe^2+": 6, "H+": 14}
    assert data["products"] == {"Cr^3+": 2, "Fe^3+": 6, "H2O": 7}
    assert data["electrons"] == 6
    assert data["medium"] == "acidic"
    assert {h["kind"]: h["n"] for h in data["halves"]} == {"reduction": 6, "oxidation": 1}
    assert data["equation"] == "Cr2O7^2- + 6 Fe^2+ + 14 H+ -> 2 Cr^3+ + 6 Fe^3+ + 7 H2O"


def test_triiodide_comproportionation_moves_five_electrons():
    # IO3- + 5 I- -> 3 I2 moves 5 e-; with I3- (= I2·I-) the count is the same
    # (Harris, Quantitative Chemical Analysis, iodometry; from memory)
    code, out, _ = _run("IO3- + I- -> I3-", "--medium", "acidic", "--format", "json")
    assert code == 0
    assert json.loads(out)["electrons"] == 5


def test_chemistry_error_exit_1():
    code, out, err = _run("Fe3+ + Sn^2+ -> Fe^2+ + Sn^4+")
    assert code == 1
    assert out == ""
    assert err.startswith("sitegen balance: error: ")
    assert "Fe^3+" in err
    code, _, err = _run("MnO4- + Fe^2+ -> Mn^2+ + Fe^3+")
    assert code == 1
    assert "cannot balance" in err


def test_usage_error_exit_2():
    code, _, err = _run("Ce^4+ + Fe^2+ -> Ce^3+ + Fe^3+", "--medium", "neutral")
    assert code == 2
    assert "usage: sitegen balance" in err
    code, _, _ = _run()
    assert code == 2


def test_help_exit_0():
    code, out, _ = _run("--help")
    assert code == 0
    assert "--medium" in out
