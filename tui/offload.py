"""The reference model's own process: the app's process never imports CoolProp.

Importing CoolProp holds the interpreter lock for 1.5-3 s, so a thread
worker alone does not keep the app live: every thread, the UI's too, waits
for the import. Reference-model work (the degrees-of-freedom check, the
adequacy advice, the solve, the diagrams) therefore runs in one worker
process, chosen in one place (:func:`call`): a ``ProcessPoolExecutor`` of one, started with
*spawn* (a fork would copy the app's threads' locks in whatever state they
are in). The app's thread workers submit to it and wait; waiting releases
the lock, so the UI stays live.

Answers come back pickled. A pickled
:class:`~balance.models.reference.Reference` leaves its CoolProp state behind
and takes its constants and reference state along, and the equations and
warnings of a result are text, so showing an answer, and filing it in the
record (:func:`balance.api.entry_data`), needs no CoolProp.

Errors: a :class:`~balance.errors.BalanceError` raised in the process comes
back as a BalanceError with the same message (its subclasses take arguments
that unpickling would not give back). The process dying, or not starting,
raises :class:`OffloadError`, also a BalanceError; the next call starts a
new process.
"""

from __future__ import annotations

import os
import sys
import threading
import time

from balance.errors import BalanceError, InputError
from balance.models import canonical


class OffloadError(BalanceError):
    """The reference-model process stopped or could not start: the work was not done."""


def uses_reference(model: str) -> bool:
    """Whether a worksheet's model text names the reference model (its work goes to the process)."""
    try:
        return canonical(model) == "reference"
    except InputError:
        return False


# -- in the child ---------------------------------------------------------------------------
def _quiet() -> None:
    """The child's start: it writes nothing on the app's terminal and leaves Ctrl+C to the app."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, 1)
    os.dup2(devnull, 2)
    os.close(devnull)


def _warm() -> None:
    """Load the domain, the unit registry and CoolProp before the first job."""
    from balance import adequacy, diagrams  # noqa: F401
    from balance.balances import closed  # noqa: F401
    from balance.species import catalogue
    from balance.units import registry

    from . import analysis  # noqa: F401

    registry()
    catalogue()
    try:
        import CoolProp.CoolProp  # noqa: F401
    except ImportError:
        pass  # the model names the missing package itself, on first use


def _run(job, *args):
    """One job; its errors made sure to cross back (a BalanceError as its message)."""
    try:
        return job(*args)
    except BalanceError as exc:
        raise BalanceError(str(exc)) from None
    except Exception as exc:  # a defect: reported by the app as an internal error
        raise RuntimeError(f"{type(exc).__name__} in the reference-model process: {exc}") from None


# -- in the app ---------------------------------------------------------------------------------
def _start_resource_tracker() -> None:
    """Start multiprocessing's resource tracker (spawned pools need it) with the real stderr.

    Inside a Textual app ``sys.stderr`` is Textual's stand-in, whose file
    descriptor is -1, which the tracker's launch refuses; the swap lasts
    as long as the launch.
    """
    from multiprocessing import resource_tracker

    captured = sys.stderr
    if sys.__stderr__ is not None:
        sys.stderr = sys.__stderr__
    try:
        resource_tracker.ensure_running()
    finally:
        sys.stderr = captured


class _Process:
    """The one worker process, started on first use and again after it died."""

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self._pool = None
        self._warm = None
        """the warm-up's future: done once CoolProp is loaded in the child"""

    def start(self):
        """The pool, started (with its warm-up queued first) if it is not running."""
        with self._lock:
            if self._pool is None:
                import multiprocessing
                from concurrent.futures import ProcessPoolExecutor

                try:
                    _start_resource_tracker()
                    pool = ProcessPoolExecutor(1, mp_context=multiprocessing.get_context("spawn"),
                                               initializer=_quiet)
                    self._warm = pool.submit(_warm)
                except (OSError, RuntimeError) as exc:
                    raise OffloadError(f"the reference-model process could not start ({exc})") from None
                self._pool = pool
            return self._pool

    def ready(self) -> bool:
        """Whether the warm-up is done: CoolProp is loaded in the child."""
        warm = self._warm
        return warm is not None and warm.done() and not warm.cancelled() and warm.exception() is None

    def call(self, job, *args):
        from concurrent.futures import BrokenExecutor, CancelledError

        pool = self.start()
        try:
            future = pool.submit(_run, job, *args)
        except RuntimeError:  # broken meanwhile (BrokenProcessPool is one), or shut down
            self._forget(pool)
            raise OffloadError("the reference-model process stopped before it took the work; it is "
                               "started again at the next try") from None
        try:
            return future.result()
        except BrokenExecutor:
            self._forget(pool)
            raise OffloadError("the reference-model process stopped unexpectedly; it is started again "
                               "at the next try") from None
        except CancelledError:
            raise OffloadError("the reference-model process was shut down before it answered") from None

    def _forget(self, pool) -> None:
        with self._lock:
            if self._pool is pool:
                self._pool = self._warm = None
        pool.shutdown(wait=False, cancel_futures=True)

    def shutdown(self) -> None:
        """Stop the child now: pending work is cancelled, running work ends with the process."""
        with self._lock:
            pool, self._pool, self._warm = self._pool, None, None
        if pool is None:
            return
        # the executor's own list (Python 3.14 has terminate_workers()), taken before shutdown drops it
        children = list((pool._processes or {}).values())
        pool.shutdown(wait=False, cancel_futures=True)
        for child in children:
            child.terminate()  # it holds nothing that could be lost: only computation
        # is_alive, not join: the executor's thread reaps the child too, and a join that loses
        # that race returns at once, leaving the child listed by multiprocessing.active_children()
        deadline = time.monotonic() + 5
        while any(child.is_alive() for child in children) and time.monotonic() < deadline:
            time.sleep(0.01)


_process = _Process()


def warm(model: str) -> None:
    """Start the process now (it loads CoolProp) when ``model`` is the reference model.

    Errors are left to the first job, which reports them.
    """
    if uses_reference(model):
        try:
            _process.start()
        except OffloadError:
            pass


def ready() -> bool:
    """Whether the process is up with CoolProp loaded (a job then waits only for itself)."""
    return _process.ready()


def shutdown() -> None:
    """Stop the process (the app's last act); a later call starts a new one."""
    _process.shutdown()


def call(model: str, job, *args):
    """``job(*args)``: in the reference-model process when ``model`` (a worksheet's model
    text) names the reference model, else here. The one place the app decides where
    domain work runs; ``job`` is a module-level function (it is pickled by name)."""
    if uses_reference(model):
        return _process.call(job, *args)
    return job(*args)
