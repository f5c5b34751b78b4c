"""The YAML reader keeps positions and refuses what would lose or explode data."""

from pathlib import Path

import pytest
import yaml

from sitegen.load import spans
from sitegen.load.spans import YamlProblem, parse_yaml


def test_positions_of_values_and_keys_are_one_based():
    p = parse_yaml("a: 1\nb:\n  - x\n  - {c: 2}\n")
    assert p.data == {"a": 1, "b": ["x", {"c": 2}]}
    assert p.values[("a",)] == (1, 4)
    assert p.values[("b", 0)] == (3, 5)
    assert p.keys[("b", 1, "c")] == (4, 6)
    assert p.values[("b", 1, "c")] == (4, 9)


@pytest.mark.parametrize(
    ("text", "rule", "line", "col"),
    [
        ("a: 1\na: 2\n", "duplicate-key", 2, 1),
        ("a: &x [1]\nb: *x\n", "yaml-alias", 2, 4),
        ("base: &b {k: 1}\nother:\n  <<: *b\n", "yaml-alias", 3, 7),
        ("a: [1\n", "yaml-syntax", 2, 1),
        ("a: 1\n---\nb: 2\n", "yaml-syntax", 2, 1),
        ("", "yaml-empty", 1, 1),
        ("? [a, b]\n: 1\n", "yaml-key", 1, 3),
    ],
)
def test_problems_have_rule_and_position(text, rule, line, col):
    with pytest.raises(YamlProblem) as exc:
        parse_yaml(text)
    assert (exc.value.rule, exc.value.line, exc.value.col) == (rule, line, col)


def test_billion_laughs_is_refused_before_expansion():
    lines = ['a0: &a0 "lol"']
    for i in range(1, 10):
        refs = ", ".join([f"*a{i - 1}"] * 10)
        lines.append(f"a{i}: &a{i} [{refs}]")
    with pytest.raises(YamlProblem) as exc:
        parse_yaml("\n".join(lines) + "\n")
    assert exc.value.rule == "yaml-alias"


def test_nesting_limit():
    text = "a: " + "[" * 60 + "]" * 60 + "\n"
    with pytest.raises(YamlProblem) as exc:
        parse_yaml(text)
    assert exc.value.rule == "yaml-too-deep"


def _both(text):
    """(fast result, pure-Python result): Parsed or the YamlProblem raised."""
    out = []
    for cls in (spans._FastLoader, spans._Loader):
        try:
            out.append(spans._parse_with(cls, text))
        except spans.YamlProblem as exc:
            out.append(exc)
        except yaml.YAMLError as exc:
            out.append(type(exc))
    return out


@pytest.mark.skipif(spans._FastLoader is None, reason="PyYAML without libyaml")
def test_libyaml_events_give_what_the_python_parser_gives():
    root = Path(__file__).resolve().parents[2]
    files = sorted(
        [*(root / "methods").rglob("*.yaml"), *(root / "tests" / "fixtures").rglob("*.yaml")]
    )
    assert len(files) > 100
    odd = [
        "a: 1\nb: [x, {c: 'é – ü', d: \"\\u00e9\"}]\n\u00e9t\u00e9: |\n  \u00fc\n  x\n",
        "\ufeffa: 1\n",
        "a:\n\t- b\n",
        "a: &x 1\nb: *x\n",
        "k: v\nk: w\n",
    ]
    for text in [f.read_text("utf-8", errors="replace") for f in files] + odd:
        fast, slow = _both(text)
        if isinstance(slow, spans.Parsed):
            # a document the pure parser accepts: the fast one gives it exactly
            assert isinstance(fast, spans.Parsed)
            assert (fast.data, fast.values, fast.keys) == (slow.data, slow.values, slow.keys)
        else:
            # refused by the pure parser: parse_yaml's answer is its answer
            with pytest.raises(spans.YamlProblem) as got:
                spans.parse_yaml(text)
            assert got.value == slow
