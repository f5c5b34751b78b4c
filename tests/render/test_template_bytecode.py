"""Compiled templates kept between processes are never stale."""

from pathlib import Path

import pytest
from jinja2.bccache import bc_magic

from sitegen.render import env as env_module
from sitegen.render.env import environment, use_bytecode_folder


@pytest.fixture
def bytecode(tmp_path: Path):
    folder = tmp_path / "bytecode"
    use_bytecode_folder(folder)
    env_module._environment.cache_clear()
    yield folder
    use_bytecode_folder(None)
    env_module._environment.cache_clear()


def _theme(tmp_path: Path, body: str) -> Path:
    theme = tmp_path / "lab"
    (theme / "templates").mkdir(parents=True, exist_ok=True)
    page = theme / "templates" / "probe.html"
    page.write_text(body, encoding="utf-8")
    return theme


def _fresh_process_render(theme: Path, **context) -> str:
    # a new process starts with no environment in memory
    env_module._environment.cache_clear()
    return environment(theme).get_template("probe.html").render(**context)


def test_compiled_templates_are_kept_and_reused(tmp_path: Path, bytecode: Path):
    theme = _theme(tmp_path, "<p>{{ name }}</p>")
    assert _fresh_process_render(theme, name="<b>") == "<p>&lt;b&gt;</p>"
    entries = [p for p in bytecode.rglob("*") if p.is_file()]
    assert len(entries) == 1
    assert not list(bytecode.rglob("*.tmp"))
    assert _fresh_process_render(theme, name="x") == "<p>x</p>"


def test_an_edited_template_is_compiled_afresh(tmp_path: Path, bytecode: Path):
    theme = _theme(tmp_path, "<p>old {{ name }}</p>")
    assert _fresh_process_render(theme, name="a") == "<p>old a</p>"
    _theme(tmp_path, "<p>new {{ name }}</p>")
    assert _fresh_process_render(theme, name="a") == "<p>new a</p>"


@pytest.mark.parametrize("damage", ["empty", "wrong header", "cut short", "bad checksum"])
def test_a_damaged_entry_is_treated_as_missing(tmp_path: Path, bytecode: Path, damage):
    theme = _theme(tmp_path, "<p>{{ name }}</p>")
    _fresh_process_render(theme, name="a")
    (entry,) = [p for p in bytecode.rglob("*") if p.is_file()]
    data = entry.read_bytes()
    entry.write_bytes({
        "empty": b"",
        "wrong header": b"j2/garbage",
        "cut short": data[: len(data) // 2],
        "bad checksum": data[: len(bc_magic)] + b"\x80garbage",
    }[damage])
    assert _fresh_process_render(theme, name="b") == "<p>b</p>"


def test_an_unwritable_folder_only_costs_time(tmp_path: Path):
    blocker = tmp_path / "file"
    blocker.write_text("not a folder", encoding="utf-8")
    use_bytecode_folder(blocker / "bytecode")
    try:
        theme = _theme(tmp_path, "<p>{{ name }}</p>")
        assert _fresh_process_render(theme, name="c") == "<p>c</p>"
    finally:
        use_bytecode_folder(None)
        env_module._environment.cache_clear()


def test_a_folder_deleted_between_builds_is_made_again(tmp_path: Path, bytecode: Path):
    # a long-lived process (the preview) outlives a user's clearing of the cache
    import shutil

    theme = _theme(tmp_path, "<p>{{ name }}</p>")
    assert _fresh_process_render(theme, name="a") == "<p>a</p>"
    shutil.rmtree(bytecode)
    assert _fresh_process_render(theme, name="b") == "<p>b</p>"
    assert [p for p in bytecode.rglob("*") if p.is_file()]
