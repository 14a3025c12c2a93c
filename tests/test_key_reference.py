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


def _sections(markdown: str) -> dict[str, str]:
    """The generated reference's sections by title (``[corners.<name>]``)."""
    out: dict[str, str] = {}
    for part in markdown.split("### `")[1:]:
        title, _, body = part.partition("`")
        out[title] = body
    return out


def test_every_key_has_a_row_in_its_tables_section() -> None:
    sections = _sections(reference_markdown())
    for key in KEYS:
        if key.name == "*":
            continue  # [corners] -> [corners.<name>], or a named value: its table's row
        if not key.parent:
            title = f"[{key.path}]"
            assert title in sections or f"[{key.path}.<name>]" in sections, key.path
            continue
        title = "[" + key.parent.replace("*", "<name>") + "]"
        assert title in sections, key.path
        assert f"\n| `{key.name}` |" in sections[title], key.path


def test_tune_car_and_tradeoff_are_generated_not_hand_written() -> None:
    sections = _sections(reference_markdown())
    for title in (
        "[tune]",
        "[tune.variables.<name>]",
        "[tune.variables.<name>.box_mm]",
        "[tune.targets]",
        "[tune.weights]",
        "[car]",
        "[tradeoff]",
    ):
        assert title in sections, title
    text = README.read_text(encoding="utf-8")
    hand_written = text.split(END, 1)[1]
    for title in ("[tune]", "[car]", "[tradeoff]"):
        assert f"### `{title}`" not in hand_written, title
