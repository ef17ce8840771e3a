"""Step 8: the record as it stands — entries, comments, sign-off."""

from __future__ import annotations

from textual.app import ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.content import Content
from textual.widgets import Button, DataTable, Static

from balance.errors import BalanceError

from .sign import SignRequest, SignScreen
from .step import StepScreen
from .text_prompt import TextPromptScreen


class ReviewScreen(StepScreen):
    STEP = "review"
    SCROLL = False
    AUTO_FOCUS = "#entries"
    HELP = """\
## Review and sign

**What it is for.** The record is the calculation's audit trail: every
committed step, every solve, every comment and sign-off, each sealed to the
one before. This step shows it and adds to it.

- ↑/↓ move through the entries; the text of the highlighted one shows below.
- `ctrl+t` comments on the highlighted entry; `ctrl+f` resolves the
  highlighted comment (or the only open one).
- `ctrl+g` signs off in a role — prepared, checked, approved, in that order.
  A sign-off covers the record as it stands; the worksheet is committed and
  solved first. Sign with an SSH key (`ssh-keygen -Y sign`; a passphrase is
  asked on the terminal) or record an unsigned sign-off.
- *Verify* checks the chain of seals, the sign-off rules and (with an
  allowed-signers file configured) the signatures.
- `f3` (or *Export*) writes the calculation report from the record, as
  Markdown or as one HTML page, beside the record unless you say where.

**Common mistakes.** The checker signing as the preparer (refused);
approving with open comments (refused); changing a step after a sign-off —
that starts a new revision, which needs signing again.
"""

    BINDINGS = [
        Binding("ctrl+t", "comment", "Comment", id="review.comment",
                tooltip="Comment on the highlighted entry"),
        Binding("ctrl+f", "resolve", "Resolve", id="review.resolve",
                tooltip="Resolve the highlighted comment (or the only open one)"),
        Binding("ctrl+g", "sign", "Sign off", id="review.sign", tooltip="Sign off the record in a role"),
    ]

    def compose_form(self) -> ComposeResult:
        yield Static("", id="summary")
        table = DataTable(id="entries", cursor_type="row", zebra_stripes=True)
        yield table
        with VerticalScroll(id="detail-scroll"):
            yield Static("", id="detail", markup=False)
        with Horizontal(classes="button-row"):
            yield Button("Comment ^t", id="comment", compact=True)
            yield Button("Resolve ^f", id="resolve", compact=True)
            yield Button("Sign off ^g", id="sign", compact=True, variant="success")
            yield Button("Verify", id="verify", compact=True)
            yield Button("Export f3", id="export", compact=True)

    def on_mount(self) -> None:
        super().on_mount()
        table = self.query_one("#entries", DataTable)
        table.add_columns("#", "kind", "by", "at (UTC)")
        self.reload()

    def reload(self, select_seq: int | None = None) -> None:
        session = self.app.session
        table = self.query_one("#entries", DataTable)
        summary = self.query_one("#summary", Static)
        table.clear()
        entries = session.entries()
        for e in entries:
            table.add_row(str(e.seq), e.kind, e.author, e.time.replace("T", " ").rstrip("Z"), key=str(e.seq))
        open_comments = session.open_comments()
        dirty = session.dirty()
        parts: list = [(f"{session.path.name}: ", "bold"), f"{len(entries)} entries"]
        if session.record is not None:
            parts.append(f", revision {session.record.revision}")
        parts.append(f"; {len(open_comments)} open comment{'' if len(open_comments) == 1 else 's'}")
        signoffs = [e for e in entries if e.kind == "sign-off"]
        if signoffs:
            last = signoffs[-1]
            parts.append(f"; last sign-off: {last.data.get('role')} by {last.data.get('signer')}")
        if dirty:
            parts += ["\n", (f"uncommitted: {', '.join(dirty)} (ctrl+s commits)", "$text-warning")]
        elif session.signed():
            last = signoffs[-1] if signoffs else None
            if last is not None and last.data.get("unsigned"):
                parts += ["\n", ("signed off since the last change, UNSIGNED: no signature proves who did",
                                  "$text-warning")]
            else:
                parts += ["\n", ("signed off since the last change", "$text-success")]
        elif entries:
            parts += ["\n", (f"next sign-off: {session.next_role()}", "$text-muted")]
        summary.update(Content.assemble(*parts))
        if entries:
            target = select_seq or entries[-1].seq
            table.move_cursor(row=target - 1)
            self._show_entry(target)
        else:
            self.query_one("#detail", Static).update("nothing committed yet: leaving a step or ctrl+s commits it")

    def _highlighted_seq(self) -> int | None:
        table = self.query_one("#entries", DataTable)
        if not table.row_count:
            return None
        return int(table.get_row_at(table.cursor_row)[0])

    def _show_entry(self, seq: int) -> None:
        entries = self.app.session.entries()
        if 1 <= seq <= len(entries):
            e = entries[seq - 1]
            self.query_one("#detail", Static).update(f"entry {e.seq}: {e.kind}\n{e.text}")

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        if event.row_key is not None and event.row_key.value is not None:
            self._show_entry(int(event.row_key.value))

    # -- actions ---------------------------------------------------------------------------
    def _guard(self, fn, *args):
        try:
            return fn(*args)
        except (BalanceError, OSError) as exc:
            self.notify(str(exc), severity="error", timeout=10)
            return None

    def action_comment(self) -> None:
        seq = self._highlighted_seq()
        if seq is None:
            self.notify("nothing to comment on yet", severity="warning")
            return
        kind = self.app.session.entries()[seq - 1].kind

        def done(text: str | None) -> None:
            if text and self._guard(self.app.session.comment, seq, text) is not None:
                self.reload()
                self.app.after_record_change()

        self.app.push_screen(TextPromptScreen(f"Comment on entry {seq}", f"entry {seq}: {kind}",
                                              "what should be checked or changed"), done)

    def action_resolve(self) -> None:
        session = self.app.session
        open_comments = session.open_comments()
        seq = self._highlighted_seq()
        target = next((c for c in open_comments if c.seq == seq), None)
        if target is None and len(open_comments) == 1:
            target = open_comments[0]
        if target is None:
            self.notify("highlight the open comment to resolve" if open_comments else "no open comments",
                        severity="warning")
            return

        def done(note: str | None) -> None:
            if note and self._guard(session.resolve, target.seq, note) is not None:
                self.reload()
                self.app.after_record_change()

        self.app.push_screen(TextPromptScreen(f"Resolve comment {target.seq}", target.data.get("text", ""),
                                              "how it was resolved"), done)

    def action_sign(self) -> None:
        session = self.app.session
        if session.record is None and not session.dirty():
            self.notify("nothing to sign yet: commit the worksheet first", severity="warning")
            return
        summary = (f"Sign off {session.path.name} as it stands. Uncommitted edits are committed and the "
                   "worksheet solved first.")
        self.app.push_screen(SignScreen(session.roles(), session.next_role(), session.default_author(), summary),
                             self._sign)

    def _sign(self, request: SignRequest | None) -> None:
        if request is None:
            return
        self.app.commit_all(quiet=True, then=lambda ok: self._sign_committed(request, ok))

    def _sign_committed(self, request: SignRequest, ok: bool) -> None:
        if not ok:
            return  # the commit said why
        faults = self.app.faults()
        if faults:
            steps = self.app.steps
            step = next(s for s in steps.order if s in faults)
            self.notify(f"not signed off: fields of step {steps[step].number} {steps[step].title} are at fault "
                        f"({faults[step]}); a sign-off covers a worksheet the record holds whole",
                        severity="error", timeout=10)
            return
        if not self.app.solve_before_signing(lambda: self._sign_now(request)):
            self._sign_now(request)

    def _sign_now(self, request: SignRequest) -> None:
        session = self.app.session

        def sign():
            return session.sign(request.role, key_path=request.key_path, signer=request.signer or None,
                                unsigned=request.unsigned)

        if request.unsigned:
            entry = self._guard(sign)
        else:
            # ssh-keygen may ask for the key's passphrase on the terminal
            try:
                with self.app.suspend():
                    entry = self._guard(sign)
            except Exception as exc:  # no terminal to hand over (headless): sign without suspending
                if type(exc).__name__ != "SuspendNotSupported":
                    raise
                entry = self._guard(sign)
        if entry is not None:
            how = "unsigned (no signature)" if entry.data.get("unsigned") else "signed with the SSH key"
            self.notify(f"signed off: {request.role} by {entry.data.get('signer')}, {how} (entry {entry.seq})",
                        severity="warning" if entry.data.get("unsigned") else "information")
        self.app.after_record_change()
        if self.is_attached:  # the user may have moved on while the solve ran
            self.reload()

    def action_verify(self) -> None:
        v = self._guard(self.app.session.verify)
        if v is None:
            return
        self.query_one("#detail", Static).update("\n".join(v.lines()))
        words, severity = verification_words(v)
        self.notify(words, severity=severity, timeout=10, markup=False)

    async def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        action = {"comment": self.action_comment, "resolve": self.action_resolve, "sign": self.action_sign,
                  "verify": self.action_verify, "export": self.app.action_export}.get(event.button.id)
        if action is not None:
            action()

    def step_commands(self):
        yield SystemCommand("Comment on the highlighted entry", "Add a review comment", self.action_comment)
        yield SystemCommand("Resolve a comment", "Resolve the highlighted (or only) open comment",
                            self.action_resolve)
        yield SystemCommand("Sign off", "Sign off the record in a role", self.action_sign)
        yield SystemCommand("Verify the record", "Check the seals, the rules and the signatures",
                            self.action_verify)


def verification_words(v) -> tuple[str, str]:
    """What a verification found, in one notice, and its severity: an unsigned sign-off is
    never reported as a plain pass (nothing proves who made it)."""
    if not v.ok:
        return f"the record does not verify: {v.reason}", "error"
    unsigned = [s for s in v.signoffs if s.status == "unsigned"]
    valid = [s for s in v.signoffs if s.status == "valid"]
    words = f"the record verifies: chain intact, {v.entries} entries"
    if not v.signoffs:
        return words + "; no sign-off yet", "information"
    if valid:
        words += f"; {len(valid)} signature{'' if len(valid) == 1 else 's'} valid"
    if unsigned:
        listed = ", ".join(f"{s.role} by {s.signer} (entry {s.seq})" for s in unsigned)
        words += f"; UNSIGNED sign-off{'' if len(unsigned) == 1 else 's'}, no signature: {listed}"
        return words, "warning"
    return words, "information"
