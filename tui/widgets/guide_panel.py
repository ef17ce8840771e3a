"""The house procedure beside a step: its guidance, what it requires here, and in practice
mode how the step compares with the firm's answer.

Shown on every step while the worksheet follows a procedure (f5 hides and shows it, the
choice kept in the draft). What it says is worked out by :func:`guide_content` from the
session, the latest solve and the practice log: a pure function, which a test reads as text.
"""

from __future__ import annotations

from textual.containers import VerticalScroll
from textual.content import Content
from textual.widgets import Static

MARK = {"pass": ("✓ ", "$text-success"), "warn": ("! ", "bold $text-warning"), "stop": ("✗ ", "bold $text-error"),
        "justified": ("≈ ", "$text-accent"), "n/a": ("· ", "$text-muted")}


def finding_line(f) -> Content:
    mark, style = MARK.get(f.outcome, MARK["n/a"])
    parts = [(mark, style), (f"{f.rule}: ", "bold"), f.message]
    if f.justification:
        parts.append((f" — deviation justified: {f.justification}", "italic"))
    return Content.assemble(*parts)


def guide_content(session, step: str, outcome=None) -> Content:
    """Everything the panel shows for ``step``."""
    p = session.procedure
    if p is None:
        return Content("")
    out = [Content.assemble(("House procedure ", "bold $text-accent"), f"{p.id} v{p.version}",
                            ("  (f5 hides)", "$text-muted"))]
    exercise = session.exercise()
    brief = []
    if exercise is not None:
        out += [Content.assemble(("PRACTICE: ", "bold $text-warning"), exercise.title),
                Content.styled("f6 checks this step against the firm's answer; f7 shows the answer", "$text-muted")]
        brief = [Content.styled("The exercise", "bold"), Content(_reflowed(exercise.brief))]
        out += _practice_lines(session, step)  # the latest comparison first: what the trainee looks for
        if step == "purpose":  # the brief first where the calculation starts; below the step's own text after
            out += brief
            brief = []
    guidance = session.guidance(step)
    if guidance:
        out += [Content(_reflowed(guidance))]
    found = [f for f in session.findings(outcome.data if _current(session, outcome) else None)
             if f.step == step and f.kind in ("required", "model", "deviation")]
    if step == "results" and _current(session, outcome):
        found += [f for f in outcome.house if f.kind == "check"]
    if found:
        title = {"results": "Acceptance checks", "fluid": "House model rules"}.get(step, "Required here (◆)")
        out.append(Content.styled(title, "bold"))
        out += [finding_line(f) for f in found]
    if step == "review":
        out += _signoff_lines(session, outcome)
    if exercise is not None:
        out += brief
    return Content("\n\n").join(out)


def _reflowed(text: str) -> str:
    """A procedure's text as paragraphs (a blank line between), each line break within one a space:
    the panel wraps it to its own width."""
    return "\n\n".join(" ".join(block.split()) for block in text.split("\n\n"))


def _current(session, outcome) -> bool:
    return outcome is not None and outcome.worksheet == session.worksheet and outcome.data is not None


def _signoff_lines(session, outcome) -> list[Content]:
    from balance.procedures import escalated_roles

    p = session.procedure
    s = p.signoff
    lines = [Content.assemble(("Sign-off: ", "bold"), ", ".join(s.roles)
                              + (", each a different person" if s.distinct else ""))]
    data = outcome.data if _current(session, outcome) else None
    for role, why in escalated_roles(p, data):
        lines.append(Content.assemble((f"{role} is required: ", "bold $text-warning"), why))
    stops = [f for f in session.findings(data) if f.blocks]
    if stops:
        lines.append(Content.assemble(("The house refuses a sign-off while ", "bold $text-error"),
                                      f"{len(stops)} rule{'s stop' if len(stops) > 1 else ' stops'}: "
                                      + ", ".join(f.rule for f in stops)
                                      + " (put it right, or justify the deviation: f8 on the results step)"))
    if session.exercise() is not None:
        lines.append(Content.styled("A practice record is never signed.", "bold"))
        lines += [Content(line) for line in session.practice_summary()]
    return lines


def _practice_lines(session, step: str) -> list[Content]:
    practice = session.extras.get("practice") or {}
    verdict = practice.get("last", {}).get(step)
    if verdict is None:
        return []
    if verdict["right"]:
        out = [Content.styled("✓ This step matches the firm's answer.", "bold $text-success")]
    else:
        out = [Content.styled("✗ This step differs from the firm's answer:", "bold $text-error")]
        out += [Content(f"• {d}") for d in verdict["differences"]]
        if verdict.get("hint"):
            out.append(Content.assemble(("Hint: ", "bold"), verdict["hint"]))
    if practice.get("log", {}).get(step, {}).get("revealed") and verdict.get("answer"):
        out.append(Content.styled("The firm's answer:", "bold"))
        out.append(Content("\n".join(verdict["answer"])))
    return out


class GuidePanel(VerticalScroll):
    """The procedure's side panel of a step (hidden without a procedure, or when f5 hid it)."""

    DEFAULT_CSS = """
    GuidePanel {
        row-span: 2;
        height: 1fr;
        padding: 0 1;
        border-left: vkey $primary 50%;
        scrollbar-size-vertical: 1;
        display: none;
    }
    GuidePanel.-shown { display: block; }
    GuidePanel > Static { width: 1fr; height: auto; }
    """

    def __init__(self, step: str, id: str | None = None) -> None:
        super().__init__(id=id, can_focus=True)  # Tab reaches it: the arrows scroll a long brief
        self.step = step

    def compose(self):
        yield Static("", id="guide-text", markup=False)

    def on_mount(self) -> None:
        for name in ("worksheet", "outcome", "guide_shown", "practice_seen"):
            self.watch(self.app, name, lambda _: self.redraw(), init=False)
        self.redraw()

    @property
    def text(self) -> str:
        """What the panel shows, as plain text (what a test reads)."""
        return guide_content(self.app.session, self.step, self.app.outcome).plain

    def redraw(self) -> None:
        shown = self.app.session.procedure is not None and self.app.guide_shown
        self.set_class(shown, "-shown")
        self.screen.set_class(shown, "-guided")
        for steps in self.screen.query("#steps"):  # the step list gives up its titles meanwhile
            if steps.has_class("-compact") != shown:
                steps.set_class(shown, "-compact")
                steps.refresh()
        if shown:
            self.query_one("#guide-text", Static).update(guide_content(self.app.session, self.step, self.app.outcome))
