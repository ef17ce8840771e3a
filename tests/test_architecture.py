"""The shape of the house: the domain never imports the user interface, and
headless command-line paths import neither Textual nor CoolProp.

Common practice, no source: a headless core with its contract enforced by
import-linter and by a subprocess import check.
"""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from tests.helpers import ROOT

HEADLESS = [
    "balance",
    "balance.units",
    "balance.species",
    "balance.models",
    "balance.mixture",
    "balance.models.cubic",
    "balance.models.idealgas",
    "balance.state",
    "balance.worksheet",
    "balance.convention",
    "balance.kinds",
    "balance.balances.control_volume",
    "balance.balances.cautions",
    "balance.balances.closed",
    "balance.balances.transient",
    "balance.balances.transient.result",
    "balance.api",
    "balance.adequacy",
    "balance.diagrams",
    "balance.record",
    "balance.record.recheck",
    "balance.study.sweep",
    "balance.study.uncertainty",
    "balance.interaction",
    "balance.models.cubic.mixing",
    "balance.procedures",
    "balance.procedures.practice",
    "tui.cli",
    "tui.record_cli",
    "tui.procedure_cli",
    "tui.session",
    "tui.draft",
    "tui.analysis",
    "tui.offload",
    "tui.steps",
]


@pytest.mark.parametrize("module", HEADLESS)
def test_headless_module_imports_no_ui_and_no_coolprop(module):
    code = (
        f"import sys, json, {module}; "
        "print(json.dumps([m for m in ('textual', 'rich', 'CoolProp') if m in sys.modules]))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    loaded = json.loads(out.stdout)
    assert "textual" not in loaded and "CoolProp" not in loaded
    if module.startswith("balance"):
        assert "rich" not in loaded


def test_solve_path_does_not_import_textual_or_coolprop():
    code = (
        "import sys, runpy; sys.argv = ['joulebook', 'solve', 'samples/n2-buffer-into-receiver.toml', '--json'];\n"
        "from tui import cli\n"
        "import contextlib, io\n"
        "with contextlib.redirect_stdout(io.StringIO()): cli.main(sys.argv[1:])\n"
        "print([m for m in ('textual', 'CoolProp', 'scipy.optimize') if m in sys.modules])"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert out.stdout.strip() == "[]", out.stdout


def test_import_linter_contract():
    pytest.importorskip("importlinter")
    out = subprocess.run([sys.executable, "-c", "from importlinter.cli import lint_imports_command; lint_imports_command()"],
                         capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0, out.stdout + out.stderr


def test_procedure_commands_import_no_ui_and_no_coolprop():
    """`joulebook procedure list|show|check` are headless: no Textual, no CoolProp."""
    code = (
        "import sys, contextlib, io\n"
        "from tui import cli\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    cli.main(['procedure', 'list']); cli.main(['procedure', 'show', 'hpp-closed-vessels'])\n"
        "print([m for m in ('textual', 'CoolProp') if m in sys.modules])"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert out.stdout.strip() == "[]", out.stdout + out.stderr


def test_the_app_steps_are_the_steps_a_procedure_names():
    """A procedure's guidance is keyed by step id (balance.kinds): the app's step table must
    list the same steps, in the same order, for every kind."""
    from balance.kinds import KINDS
    from tui.steps import STEPS_BY_KIND

    assert {kind: tuple(s.id for s in steps) for kind, steps in STEPS_BY_KIND.items()} == \
        {kind: k.steps for kind, k in KINDS.items()}


def test_every_step_that_edits_a_kind_s_sections_is_in_the_one_map():
    """The app commits and practice mode compares each step by balance.kinds.STEP_SECTIONS: every
    section a kind reads but the heading's is edited by one of its steps (common practice, no source)."""
    from balance.kinds import KINDS, STEP_SECTIONS

    for kind in KINDS.values():
        edited = {s for step in kind.steps for s in STEP_SECTIONS.get(step, ())}
        assert edited == set(kind.sections), kind.name


