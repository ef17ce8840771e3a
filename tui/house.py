"""The app under a house procedure (a mixin of :class:`tui.app.JoulebookApp`).

f5 shows or hides the procedure's side panel (:mod:`tui.widgets.guide_panel`); in practice
mode f6 checks the step against the exercise's model answer (a step is also checked as the
trainee leaves it) and f7 shows the answer; f8, on the results step, writes the justification
of a deviation from a rule that stops (kept in the worksheet's heading, and so in the record,
where the checker sees it).
"""

from __future__ import annotations

from dataclasses import replace

from balance.errors import BalanceError

#: The actions of this mixin, and when each is offered.
HOUSE_ACTIONS = ("toggle_guide", "check_step", "show_answer", "justify")


class HouseMode:
    def house_action_state(self, action: str) -> bool | None:
        """For check_action: True offered, None greyed, False hidden."""
        session = self.session
        if session.procedure is None:
            return False
        if action == "toggle_guide":
            return True
        practising = session.exercise() is not None
        if action in ("check_step", "show_answer"):
            if not practising:
                return False
            return True if session.step != "review" else None
        if action == "justify":
            if session.step != "results":
                return False
            return True if self._unjustified() else None
        return True

    def _unjustified(self) -> list:
        outcome = self.outcome
        data = outcome.data if outcome is not None and outcome.worksheet == self.session.worksheet else None
        return [f for f in self.session.findings(data) if f.blocks]

    def action_toggle_guide(self) -> None:
        self.guide_shown = not self.guide_shown
        self.session.set_extra("guide", self.guide_shown)

    def practise_step(self, step: str, quiet: bool = False) -> None:
        """Compare ``step`` with the exercise's answer and say how it went."""
        outcome = self.outcome
        data = outcome.data if outcome is not None and outcome.worksheet == self.session.worksheet else None
        if step == "results" and data is None:
            if not quiet:
                self.notify("solve first (ctrl+r): the results are compared with the firm's answer", severity="warning")
            return
        try:
            verdict = self.session.practise(step, data)
        except BalanceError as exc:
            self.notify(f"practice: {exc}", severity="error", markup=False)
            return
        if verdict is None:
            return
        self.practice_seen += 1
        title = self.steps[step].title if step in self.steps else step
        if verdict.right and step == "results":
            summary = self.session.practice_summary()
            self.notify(f"{title}: matches the firm's answer. Exercise done: {summary[-1]} (the review step lists "
                        "each)", markup=False, timeout=15)
        elif verdict.right:
            self.notify(f"{title}: matches the firm's answer", markup=False)
        else:
            self.notify(f"{title}: {len(verdict.differences)} difference{'s' if len(verdict.differences) > 1 else ''} "
                        "from the firm's answer (see the side panel, f5; f7 shows the answer)",
                        severity="warning", markup=False)

    def action_check_step(self) -> None:
        self.commit_all(quiet=True)
        self.practise_step(self.session.step)

    def action_show_answer(self) -> None:
        step = self.session.step
        last = (self.session.extras.get("practice") or {}).get("last", {})
        if step not in last:
            self.practise_step(step, quiet=True)
        self.session.reveal(step)
        self.guide_shown = True
        self.practice_seen += 1

    def house_leaving(self, step: str) -> None:
        """A step is being left: in practice mode, compare it (an input step where something
        was typed: passing through a step is not a try)."""
        if (self.session.exercise() is not None and step in self.steps and self.steps[step].sections
                and self.session.typed_at(step)):
            self.practise_step(step, quiet=True)

    def action_justify(self) -> None:
        stops = [f for f in self._unjustified() if f.kind != "required"] or self._unjustified()
        if not stops:
            self.notify("no house rule stops this calculation: nothing to justify")
            return
        rule = stops[0]
        from .screens.text_prompt import TextPromptScreen

        def written(text: str | None) -> None:
            if not text:
                return
            ws = self.session.worksheet
            heading = replace(ws.heading, deviations={**ws.heading.deviations, rule.rule: text})
            self.edit(ws.with_(heading=heading))
            self.commit_all(quiet=True)
            self.notify(f"deviation from {rule.rule} justified; the checker sees it in the record", markup=False)

        self.push_screen(TextPromptScreen(f"Justify the deviation from {rule.rule}",
                                          f"{rule.message}\n\nWhy is departing from this house rule right here? "
                                          "The justification is kept in the record for the checker.",
                                          "the reason, in a sentence or two"), written)

    def house_commands(self):
        """The palette's commands of the house procedure (none without one)."""
        from textual.app import SystemCommand

        if self.session.procedure is None:
            return
        yield SystemCommand("Show or hide the house guidance", "The procedure's guidance beside the step (f5)",
                            self.action_toggle_guide)
        if self.session.exercise() is not None:
            yield SystemCommand("Check this step against the firm's answer", "Practice mode (f6)",
                                self.action_check_step)
            yield SystemCommand("Show the firm's answer for this step", "Practice mode (f7)", self.action_show_answer)
        if self.session.step == "results" and self._unjustified():
            yield SystemCommand("Justify a deviation from a house rule", "A rule that stops the sign-off (f8)",
                                self.action_justify)
