"""A lab's theme folder needs only the files it changes."""

from pathlib import Path

from sitegen.render.env import DEFAULT_THEME, environment, theme_layers
from sitegen.render.site import _static


def test_lab_theme_overrides_and_falls_back(tmp_path: Path):
    lab = tmp_path / "lab"
    (lab / "static").mkdir(parents=True)
    (lab / "static" / "site.css").write_bytes(b"/* lab */")
    (lab / "templates").mkdir()
    base = (DEFAULT_THEME / "templates" / "base.html").read_text(encoding="utf-8")
    (lab / "templates" / "base.html").write_text("<!-- lab layout -->\n" + base, encoding="utf-8")
    assert theme_layers(lab) == [lab.resolve(), DEFAULT_THEME.resolve()]
    files = _static(lab)
    assert files["static/site.css"] == b"/* lab */"
    assert "static/search.js" in files  # from the default theme
    env = environment(lab)
    assert env.get_template("base.html").render is not None
    assert "lab layout" in env.loader.get_source(env, "base.html")[0]
    # a template the lab did not supply comes from the default theme
    assert env.loader.get_source(env, "method.html")[1].startswith(str(DEFAULT_THEME.resolve()))
