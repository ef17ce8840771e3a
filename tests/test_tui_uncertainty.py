"""The results step shows each main result's uncertainty and its budget when the worksheet's
values carry uncertainties; the record's solve entry keeps the same budget (the numbers are the
domain's, tests/test_uncertainty.py holds them to closed forms)."""

from __future__ import annotations

from .test_output_app import text_of
from .test_tui_flow_diagrams import _results
from .test_tui_pilot import SIZE, author, sample_app  # noqa: F401

SAMPLE = "n2-sample-cylinder-bath-uncertain.toml"


async def test_the_budget_is_shown_beside_the_result_and_kept_in_the_record(tmp_path, author):  # noqa: F811
    app = sample_app(tmp_path, SAMPLE)
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await _results(pilot)
        assert app.outcome.uncertainty is not None
        shown = text_of(app, "#balance")
        assert "Uncertainty of the results" in shown and "(k = 2)" in shown and "share" in shown
        assert "initial 'filled'.T" in shown
    entry = app.session.entries()[-1]
    assert entry.kind == "solve" and entry.data["uncertainty"] == app.outcome.data["uncertainty"]
