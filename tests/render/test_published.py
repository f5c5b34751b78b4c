"""The published methods: every loaded method but the excluded ones, in id order."""

from types import SimpleNamespace

from sitegen.render.pages import published_methods


def test_view_hides_the_excluded_and_iterates_in_id_order():
    methods = {"b-method": "B", "a-method": "A", "c-method": "C"}
    col = SimpleNamespace(methods=methods)
    opts = SimpleNamespace(excluded=(("b-method", "E-RULE: why"),))
    pub = published_methods(col, opts)
    assert list(pub) == ["a-method", "c-method"]
    assert dict(pub.items()) == {"a-method": "A", "c-method": "C"}
    assert len(pub) == 2
    assert "b-method" not in pub and pub.get("b-method") is None
    assert "a-method" in pub and pub["a-method"] == "A"
    # a view: a method dropped from the collection later is gone from it too
    del methods["c-method"]
    assert list(pub) == ["a-method"]
