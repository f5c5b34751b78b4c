"""The GHS table against outside wording and signal words.

Statement wording: UN GHS Rev. 10 (2023), Annex 3, and CLP (Regulation
(EC) No 1272/2008) Annex III/IV for the EU English spelling; signal words:
UN GHS Rev. 10 class chapters (parts 2-4). All values below are quoted
from memory, not read from a document here.
"""

import pytest

from sitegen.hazards import ghs

# (code, wording) - UN GHS Rev. 10 Annex 3 / CLP Annex III (from memory)
H_WORDING = [
    ("H272", "May intensify fire; oxidiser."),
    ("H290", "May be corrosive to metals."),
    ("H302", "Harmful if swallowed."),
    ("H314", "Causes severe skin burns and eye damage."),
    ("H319", "Causes serious eye irritation."),
    ("H330", "Fatal if inhaled."),
    ("H350", "May cause cancer."),
    ("H400", "Very toxic to aquatic life."),
    ("H410", "Very toxic to aquatic life with long lasting effects."),
    ("H301+H311", "Toxic if swallowed or in contact with skin."),
    ("H360FD", "May damage fertility. May damage the unborn child."),  # CLP Annex III
    ("EUH032", "Contact with acids liberates very toxic gas."),  # CLP Annex III part 2
]

# UN GHS Rev. 10 Annex 3 / CLP Annex IV (from memory)
P_WORDING = [
    ("P273", "Avoid release to the environment."),
    ("P301+P330+P331", "IF SWALLOWED: Rinse mouth. Do NOT induce vomiting."),
    (
        "P305+P351+P338",
        "IF IN EYES: Rinse cautiously with water for several minutes. Remove contact lenses,"
        " if present and easy to do. Continue rinsing.",
    ),
    ("P405", "Store locked up."),
]

# (code, every signal word its categories carry) - UN GHS Rev. 10 class
# chapters (from memory): oxidising liquids/solids cat. 2 Danger, cat. 3
# Warning (both H272); acute toxicity cat. 1-3 Danger, cat. 4 Warning;
# skin corrosion 1 Danger; carcinogenicity 1 Danger, 2 Warning; acute
# aquatic 1 Warning; chronic aquatic 2 no signal word.
SIGNALS = [
    ("H271", ("Danger",)),
    ("H272", ("Danger", "Warning")),
    ("H300", ("Danger",)),
    ("H302", ("Warning",)),
    ("H314", ("Danger",)),
    ("H318", ("Danger",)),
    ("H350", ("Danger",)),
    ("H351", ("Warning",)),
    ("H400", ("Warning",)),
    ("H411", ("none",)),
    ("H362", ("none",)),  # effects on or via lactation: no signal word
]


@pytest.mark.parametrize(("code", "text"), H_WORDING + P_WORDING)
def test_wording(code, text):
    assert ghs.statement(code) == text


@pytest.mark.parametrize(("code", "signals"), SIGNALS)
def test_signal_options(code, signals):
    assert ghs.signal_options(code) == signals


@pytest.mark.parametrize(
    ("code", "word"),
    [("H350", "Danger"), ("H314", "Danger"), ("H302", "Warning"), ("H400", "Warning"),
     ("H272", "Warning"), ("H412", "none")],
)
def test_signal_for_h_is_the_weakest_the_code_carries(code, word):
    # H272: category 3 oxidisers carry Warning, so H272 alone implies no more.
    assert ghs.signal_for_h(code) == word


def test_pictogram_names():
    # UN GHS Rev. 10, Annex 1 / 1.4.10.4.2 pictogram names (from memory)
    expected = {
        "GHS01": "exploding bomb",
        "GHS02": "flame",
        "GHS03": "flame over circle",
        "GHS04": "gas cylinder",
        "GHS05": "corrosion",
        "GHS06": "skull and crossbones",
        "GHS07": "exclamation mark",
        "GHS08": "health hazard",
        "GHS09": "environment",
    }
    assert {c: ghs.pictogram_name(c) for c in expected} == expected
    with pytest.raises(KeyError, match="GHS10"):
        ghs.pictogram_name("GHS10")


def test_table_covers_the_stated_ranges():
    # The header promises these; each is a distinct GHS/CLP code.
    for code in ("H200", "H225", "H260", "H290", "H304", "H336", "H373", "H413", "H420",
                 "EUH014", "EUH029", "EUH031", "EUH066", "EUH071", "EUH208", "EUH210",
                 "EUH401"):
        assert ghs.known_h(code), code
    for code in ("P101", "P210", "P284", "P302+P352", "P304+P340", "P308+P313", "P370+P378",
                 "P403+P233", "P501", "P503"):
        assert ghs.known_p(code), code
    assert not ghs.known_h("H299")
    assert not ghs.known_p("P504")
    assert not ghs.known_h("P280") and not ghs.known_p("H314")


def test_every_hazard_entry_is_well_formed():
    t = ghs.table()
    for code, entry in t.hazard.items():
        assert entry.text.endswith((".", ")")), code
        assert entry.signals and set(entry.signals) <= set(ghs.SIGNAL_RANK), code
        assert set(entry.pictograms) <= set(t.pictograms), code


def test_normal_form_keeps_clp_suffix_case():
    assert ghs.normalise(" p305 + p351 +p338") == "P305+P351+P338"
    assert ghs.normalise("h361d") == "H361d"
    # H360Fd and H360FD are different CLP statements (CLP Annex III, from memory)
    assert ghs.statement("H360Fd") != ghs.statement("H360FD")
    assert not ghs.known_h("H360fd")


def test_canonical_order():
    codes = ["EUH014", "H314", "H302+H312", "H302", "H290", "H350i", "H350"]
    assert sorted(codes, key=ghs.code_sort_key) == [
        "H290", "H302", "H302+H312", "H314", "H350", "H350i", "EUH014"
    ]
    p = ["P501", "P305+P351+P338", "P280", "P301+P330+P331", "P264"]
    assert sorted(p, key=ghs.code_sort_key) == [
        "P264", "P280", "P301+P330+P331", "P305+P351+P338", "P501"
    ]


def test_unknown_code_raises_naming_it():
    with pytest.raises(KeyError, match="H999"):
        ghs.statement("H999")


def test_combined_text_of_nonstandard_combination():
    assert ghs.combined_text("P304+P340+P310") == (
        "IF INHALED: Remove person to fresh air and keep comfortable for breathing."
        " Immediately call a POISON CENTRE/doctor/..."
    )
    assert ghs.combined_text("P304+P999") is None
    assert ghs.combined_text("P304") is None


def test_withdrawn_codes_are_known_but_flagged():
    assert ghs.known_p("P302+P350") and ghs.is_withdrawn("P302+P350")
    assert not ghs.is_withdrawn("P302+P352")
