"""The figures: one idea each, the expected axes and labels, the check's status in each
title, the limit drawn, left and right told apart, and the numbers drawn equal to the
ones they show (closed forms where one exists)."""

from __future__ import annotations

import numpy as np
import pytest

from designs import EXAMPLE, ROOT
from plumbrod.design.loading import load_design
from plumbrod.outputs.figure_style import figure_bytes
from plumbrod.outputs.plots import FIGURES, figures
from plumbrod.verdict.findings import Findings, review

FAILING = ROOT / "examples" / "failing_short_lever.toml"


@pytest.fixture(scope="module")
def drawn() -> dict[str, tuple[Findings, dict]]:
    out = {}
    for name, path in (("splitter", EXAMPLE), ("failing", FAILING)):
        findings = review(load_design(path))
        out[name] = (findings, figures(findings))
    return out


def _titles(figure) -> str:
    return " ".join(ax.get_title(loc) for ax in figure.axes for loc in ("left", "center", "right"))


@pytest.mark.parametrize("name", ["splitter", "failing"])
def test_every_figure_has_data_labels_and_a_status(drawn, name):
    _, figs = drawn[name]
    assert list(figs) == list(FIGURES)
    labels = {
        "route-ratio": [("wheel travel, mm (+ bump)", "route ratio, mm/mm")],
        "ride-height": [
            ("body heave, mm (+ up)", "ride-height change per heave, mm/mm"),
            ("body roll, deg (+ lifts the left side)", "ride-height change per roll, mm/deg"),
            ("body pitch, deg (+ nose down)", "ride-height change per pitch, mm/deg"),
        ],
        "line-of-action": [("wheel travel, mm (+ bump)", "from vertical, deg")],
        "transmission": [("wheel travel, mm (+ bump)", "transmission angle, deg")],
        "reserves": [("", "reserve factor (log")],
        "clearance": [("wheel travel, mm (+ bump)", "least distance, mm")],
        "spring-share": [("", "spring-load change / element load")],
    }
    for kind, figure in figs.items():
        axes = [ax for ax in figure.axes if ax.axison]
        assert axes and any(ax.lines for ax in axes), kind
        for (xlabel, ylabel), ax in zip(labels[kind], axes, strict=False):
            assert ax.get_xlabel() == xlabel or not xlabel, kind
            assert ax.get_ylabel().startswith(ylabel), (kind, ax.get_ylabel())
        assert any(word in _titles(figure) for word in ("PASS", "WARN", "FAIL")), kind
        assert figure_bytes(figure, "png")[:8] == b"\x89PNG\r\n\x1a\n"


def test_status_in_the_title_is_the_checks(drawn):
    findings, figs = drawn["failing"]
    status = {c.id: c.status.upper() for c in findings.checks}
    # the failing example's header: route ratio and ride-height sensitivity fail
    assert status["route-ratio"] == "FAIL" and status["ride-height-sensitivity"] == "FAIL"
    assert figs["route-ratio"].axes[0].get_title("left").strip() == "FAIL"
    assert figs["ride-height"].axes[0].get_title("left").strip() == "FAIL"
    assert figs["reserves"].axes[0].get_title("left").strip() == status["buckling"]


def test_limits_are_drawn(drawn):
    findings, figs = drawn["splitter"]
    limits = findings.analysis.design.limits
    # route ratio band: DESIGN §6 default 1 +- 0.05 unless the file sets it
    ax = figs["route-ratio"].axes[0]
    lo, hi = limits.route_ratio
    patch = ax.patches[0]
    ys = patch.get_transform().transform(patch.get_path().vertices)
    ys = ax.transData.inverted().transform(ys)[:, 1]
    assert ys.min() == pytest.approx(lo) and ys.max() == pytest.approx(hi)
    # reserves: the required reserves as horizontal lines
    levels = {
        float(line.get_ydata()[0])
        for line in figs["reserves"].axes[0].lines
        if len(set(np.atleast_1d(line.get_ydata()))) == 1
    }
    assert {limits.buckling_reserve, limits.tension_reserve} <= levels


def test_left_and_right_are_told_apart(drawn):
    _, figs = drawn["splitter"]
    for kind in ("route-ratio", "reserves", "line-of-action"):
        lines = {line.get_label(): line for line in figs[kind].axes[0].lines}
        pairs = [(k, k.replace("left", "right")) for k in lines if "left" in k]
        assert pairs, kind
        for left, right in pairs:
            a, b = lines[left], lines[right]
            assert a.get_color() == b.get_color()
            assert (a.get_linestyle(), a.get_marker()) != (b.get_linestyle(), b.get_marker())


def test_reserve_factor_is_capacity_over_force(drawn):
    # DESIGN §5 item 7: RF = P_cr/|P| in compression, S_y·A/P in tension
    findings, figs = drawn["splitter"]
    analysis = findings.analysis
    st = analysis.statics["travel"]
    ax = figs["reserves"].axes[0]
    lines = {line.get_label(): line for line in ax.lines}
    for rod in analysis.design.rods:
        force = st.rod_force_N[:, 0, analysis.link.rod_names.index(rod.name)]
        r = findings.reserves[rod.name]
        want = np.where(force < 0, r.critical_load_N / -force, r.tension_capacity_N / force)
        got = lines[rod.name].get_ydata()
        assert np.allclose(got, np.minimum(want, 100.0), rtol=1e-12)


def test_svg_is_the_same_twice(drawn):
    _, figs = drawn["splitter"]
    figure = figs["route-ratio"]
    assert figure_bytes(figure, "svg") == figure_bytes(figure, "svg")
    assert b"<dc:date>" not in figure_bytes(figure, "svg")
