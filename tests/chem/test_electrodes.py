"""Tests for sitegen.chem.electrodes."""

import pytest

from sitegen.chem.electrodes import REFERENCE_ELECTRODES, from_reference, vs_reference


@pytest.mark.parametrize(
    ("key", "offset"),
    [
        # Bard & Faulkner, Electrochemical Methods, 2nd ed., Table C.2 (from memory).
        ("SHE", 0.0),
        ("SCE", 0.241),
        ("Ag/AgCl-sat", 0.197),
        ("Ag/AgCl-3M", 0.210),
    ],
)
def test_offsets(key, offset):
    assert REFERENCE_ELECTRODES[key].offset_V == pytest.approx(offset, abs=5e-4)
    assert REFERENCE_ELECTRODES[key].key == key
    assert REFERENCE_ELECTRODES[key].source


def test_fe_couple_vs_sce():
    # Fe3+/Fe2+ E0 = 0.771 V vs SHE is 0.530 V vs SCE
    # (Harris, Quantitative Chemical Analysis, reference-electrode conversion; from memory).
    assert vs_reference(0.771, "SCE") == pytest.approx(0.530, abs=1e-3)


def test_round_trip():
    for key in REFERENCE_ELECTRODES:
        assert from_reference(vs_reference(1.234, key), key) == pytest.approx(1.234, abs=1e-12)


def test_sce_to_agcl_difference():
    # Between SCE and Ag/AgCl (sat. KCl) lies 0.044 V (0.241 - 0.197, same table).
    e = 0.5
    assert vs_reference(e, "Ag/AgCl-sat") - vs_reference(e, "SCE") == pytest.approx(0.044, abs=1e-3)


def test_unknown_key_lists_known():
    with pytest.raises(KeyError) as exc:
        vs_reference(0.5, "Hg/HgO")
    msg = str(exc.value)
    for key in ("SHE", "SCE", "Ag/AgCl-sat", "Ag/AgCl-3M"):
        assert key in msg


def test_table_is_read_only():
    with pytest.raises(TypeError):
        REFERENCE_ELECTRODES["X"] = REFERENCE_ELECTRODES["SHE"]  # type: ignore[index]
