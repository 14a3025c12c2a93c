"""The key reference in examples/README.md is the one generated from the schema table."""

from __future__ import annotations

from plumbrod.design.reference import BEGIN, END, README, reference_markdown, replace_reference
from plumbrod.design.schema import KEYS


def test_readme_reference_matches_the_schema_table() -> None:
    text = README.read_text(encoding="utf-8")
    assert BEGIN in text and END in text, "the README lost its generated-part markers"
    assert replace_reference(text) == text, (
        "examples/README.md's key reference differs from src/plumbrod/design/schema.py; "
        "regenerate it with `python -m plumbrod.design.reference --write`"
    )


def test_every_closed_key_appears_in_the_reference() -> None:
    markdown = reference_markdown()
    for key in KEYS:
        if key.open or any(entry_open(p) for p in _parents(key.path)):
            continue
        if key.name == "*" and key.kind not in ("table", "named"):
            continue  # a named value: its table's row says what it is
        name = key.name
        title = "[" + key.path.replace("*", "<name>")
        assert f"`{name}`" in markdown or title in markdown, key.path


def _parents(path: str) -> list[str]:
    parts = path.split(".")
    return [".".join(parts[:i]) for i in range(1, len(parts))]


def entry_open(path: str) -> bool:
    from plumbrod.design.schema import entry

    return entry(path).open
