"""Every module declares a sorted ``__all__`` that names only what exists."""

import importlib
import pkgutil

import sitegen


def _modules():
    for info in pkgutil.walk_packages(sitegen.__path__, "sitegen."):
        if info.name.endswith("__main__"):
            continue
        yield importlib.import_module(info.name)


def test_all_is_sorted_and_resolves():
    seen = 0
    for mod in _modules():
        names = getattr(mod, "__all__", None)
        if names is None:
            assert mod.__name__.endswith("__init__") or hasattr(mod, "__path__"), mod.__name__
            continue
        seen += 1
        # plain sorted, or isort style (CONSTANTS, then Classes, then functions)
        isort = sorted(names, key=lambda n: (0 if n.isupper() else 1 if n[:1].isupper() else 2, n))
        assert list(names) in (sorted(names), isort), mod.__name__
        for n in names:
            assert hasattr(mod, n), (mod.__name__, n)
    assert seen > 10


def test_package_api():
    assert sitegen.__all__ == ["Finding", "Severity", "SitegenError", "Span", "build", "check"]
