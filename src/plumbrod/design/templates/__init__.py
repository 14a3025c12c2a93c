"""Design files shipped with the package: the commented starter and the bundled
example (an exact copy of ``examples/hillclimb_splitter.toml``)."""

from importlib import resources

__all__ = ["BUNDLED_EXAMPLE", "STARTER", "read_template"]

STARTER = "starter.toml"
BUNDLED_EXAMPLE = "hillclimb_splitter.toml"


def read_template(name: str) -> str:
    """The text of a shipped design file."""
    return resources.files("plumbrod.design.templates").joinpath(name).read_text(encoding="utf-8")
