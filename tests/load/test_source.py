"""Reading refuses huge, binary and non-UTF-8 files with a position."""

from sitegen.load.source import MAX_BYTES, Source, SourceProblem, decode


def test_utf8_and_bom():
    s = decode("x.yaml", "\ufeffa: é\n".encode())
    assert isinstance(s, Source) and s.text == "a: é\n" and len(s.fingerprint) == 12


def test_latin1_reports_line_and_column():
    p = decode("x.yaml", b"a: 1\nname: caf\xe9\n")
    assert isinstance(p, SourceProblem)
    assert (p.rule, p.line, p.col) == ("not-utf8", 2, 10)


def test_binary_and_huge():
    assert decode("x", b"a: 1\n\x00\x01").rule == "binary-file"  # type: ignore[union-attr]
    assert decode("x", b"#" * (MAX_BYTES + 1)).rule == "file-too-large"  # type: ignore[union-attr]
