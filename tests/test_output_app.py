"""The results step at 80×24, by key presses: the headline names every solved term, once, and
follows the display units (f2).

Expected values: the methane sample's own solve (tests/test_output_explanation.py checks the
closed forms behind such numbers); the unit conversions are pint's.
"""

from __future__ import annotations

import io

from rich.console import Console

from tests.test_tui_pilot import SIZE, author, ready, sample_app, solve_on_results  # noqa: F401  (fixture)


def text_of(app, selector: str) -> str:
    """What a Static shows, as plain text (a rich renderable printed 200 columns wide)."""
    shown = app.screen.query_one(selector).content
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(shown)
    return out.getvalue()


async def test_the_headline_shows_the_boundary_work_and_follows_the_units(tmp_path, author):  # noqa: F811
    app = sample_app(tmp_path, "methane-piston-isothermal.toml")
    app.session.step = "results"
    async with app.run_test(size=SIZE) as pilot:
        await ready(pilot)
        await solve_on_results(pilot)
        head = " ".join(text_of(app, "#outcome").split())
        assert head == ("solved: end: T = 25 °C, P = 60 bar(a); Q 'jacket' = -13.735 kJ; "
                        "W boundary (isothermal) = 12.291 kJ; S_gen = 0 (reversible)")
        assert "Result:" not in text_of(app, "#balance")  # said once, above the tabs
        await pilot.press("f2")  # metric -> US customary
        await pilot.pause()
        head = " ".join(text_of(app, "#outcome").split())
        assert head.startswith("solved: end: T = 77 °F, P = 870.23 psia; Q 'jacket' = -13.018 Btu; "
                               "W boundary (isothermal) = 11.649 Btu")
