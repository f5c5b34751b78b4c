"""Quantities are read with pint; conversions checked against SI definitions."""

import pytest

from sitegen.units import UnitError, parse_measure


@pytest.mark.parametrize(
    ("text", "kind", "value", "decimals"),
    [
        ("25.00 mL", "volume", 25.0, 2),
        ("0.025 L", "volume", 25.0, 3),
        ("0.02000 mol/L", "concentration", 0.02, 5),
        ("20 mmol/L", "concentration", 0.02, 0),
        ("0.1 M", "concentration", 0.1, 1),
        ("25 °C", "temperature", 298.15, 0),  # 0 °C = 273.15 K (SI brochure, 9th ed.)
        ("1.44 V", "potential", 1.44, 2),
        ("250 mV", "potential", 0.25, 0),
        ("0.2500 g", "mass", 0.25, 4),
        ("250.0 mg", "mass", 0.25, 1),
    ],
)
def test_reads_and_normalises(text, kind, value, decimals):
    m = parse_measure(text, kind)
    assert m.value == pytest.approx(value, rel=1e-12)
    assert m.decimals == decimals
    assert m.text == text


@pytest.mark.parametrize(
    ("text", "kind"),
    [("25 g", "volume"), ("25", "volume"), ("twenty mL", "volume"), ("1 furlong", "mass")],
)
def test_rejects(text, kind):
    with pytest.raises(UnitError):
        parse_measure(text, kind)


def test_a_registry_read_from_pint_disk_cache_converts_the_same(tmp_path):
    # The build lets pint keep its parsed definitions on disk; a registry
    # restored from there must read quantities exactly as a fresh one does.
    import json
    import subprocess
    import sys

    texts = [("25.00 mL", "volume"), ("25 °C", "temperature"), ("250.0 mg", "mass"),
             ("20 mmol/L", "concentration"), ("12.5 %", "mass_fraction")]
    prog = (
        "import json, sys\n"
        "from pathlib import Path\n"
        "import sitegen.units as u\n"
        "if sys.argv[1]: u.use_cache_folder(Path(sys.argv[1]))\n"
        f"print(json.dumps([u.parse_measure(t, k).value for t, k in {texts!r}]))\n"
    )

    def run(folder: str) -> list[float]:
        out = subprocess.run([sys.executable, "-c", prog, folder], capture_output=True,
                             text=True, check=True)
        return json.loads(out.stdout)

    fresh = run("")
    assert run(str(tmp_path)) == fresh  # writes the cache
    assert any(tmp_path.iterdir())
    assert run(str(tmp_path)) == fresh  # reads it
    assert fresh == pytest.approx([25.0, 298.15, 0.25, 0.02, 12.5], rel=1e-12)  # SI brochure


def test_results_kept_between_processes_need_no_pint_and_agree(tmp_path):
    # A build keeps what units.known() returns; a process primed with it
    # reads the same quantities (and refuses the same bad ones) without
    # importing pint.
    import pickle
    import subprocess
    import sys

    from sitegen import units

    good = [("25.00 mL", "volume"), ("0.1 M", "concentration"), ("250.0 mg", "mass")]
    want = [parse_measure(t, k) for t, k in good]
    with pytest.raises(UnitError):
        parse_measure("25 furlongs", "volume")
    assert units.convert(12.5, "%", "mg/g") == pytest.approx(125.0)  # 1 % = 10 mg/g
    kept = tmp_path / "kept.pickle"
    kept.write_bytes(pickle.dumps(units.known()))
    prog = (
        "import pickle, sys\n"
        "import sitegen.units as u\n"
        "u.prime(pickle.load(open(sys.argv[1], 'rb')))\n"
        f"got = [u.parse_measure(t, k) for t, k in {good!r}]\n"
        "try:\n"
        "    u.parse_measure('25 furlongs', 'volume'); bad = 'read'\n"
        "except u.UnitError as e:\n"
        "    bad = str(e)\n"
        "conv = u.convert(12.5, '%', 'mg/g')\n"
        "print(pickle.dumps((got, bad, conv, 'pint' in sys.modules)).hex())\n"
    )
    out = subprocess.run([sys.executable, "-c", prog, str(kept)], capture_output=True,
                         text=True, check=True)
    got, bad, conv, pint_loaded = pickle.loads(bytes.fromhex(out.stdout.strip()))
    assert got == want and conv == pytest.approx(125.0)
    assert "furlongs" in bad and not pint_loaded
