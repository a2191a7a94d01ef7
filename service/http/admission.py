"""Admission of calculation requests: counted from arrival, a bounded queue, a wait budget,
and the calculation itself on worker threads so the event loop never computes.

Every POST under ``/v1/`` is a calculation. Two pure-ASGI middlewares share one
``Admission``:

- ``AdmissionGate`` (outer) sees the request as soon as its headers are in. It refuses at
  once (503 problem, ``Retry-After``) when the worker is draining for shutdown or when the
  queue is already full, and gives the body a deadline (``client_timeout_s`` from arrival;
  408 problem past it), so a slow client never gets further than reading its body.
- ``CalculationSlots`` (inner, after the result cache has read the whole body) waits for
  one of ``slots`` calculation threads, at most ``queue`` requests waiting at a time and
  none past ``budget_s`` from its arrival (503 problem, ``Retry-After``; at once when the
  requests ahead of it at the average calculation time would take longer), then runs the
  rest of the application (validation, the calculation, rendering) on that thread's own
  event loop and sends the buffered answer from the server's loop.

So probes, metrics, cache hits, accepting and shutdown stay on a loop that never computes.
``slots=0`` runs calculations on the server's loop as before (kept to measure against).
"""

from __future__ import annotations

import asyncio
import contextlib
import sys
import time
from collections import deque
from dataclasses import dataclass, field
from typing import Protocol

from starlette.responses import Response
from starlette.types import ASGIApp, Message, Receive, Scope, Send

from service.http.body import no_body, read_body, replayed
from service.http.bodycheck import MAX_OBJECT_FIELDS, crowded_object
from service.http.problems import problem_response
from service.http.slot_thread import SlotThread

__all__ = ["Admission", "AdmissionGate", "CalculationSlots", "is_calculation"]

_ARRIVED = "gearwork_arrived"


def is_calculation(scope: Scope, prefix: str = "/v1/") -> bool:
    """Whether a request is a calculation (an HTTP POST under ``prefix``)."""
    return (
        scope["type"] == "http"
        and scope.get("method") == "POST"
        and str(scope.get("path", "")).startswith(prefix)
    )


class AdmissionMetrics(Protocol):
    """What admission reports to the metrics (see service.http.observability.Metrics)."""

    def queue_changed(self, waiting: int, computing: int) -> None: ...

    def waited(self, seconds: float, outcome: str) -> None: ...


@dataclass
class Admission:
    """The admission state of one worker process.

    Parameters
    ----------
    slots : int
        Calculations run at once (threads); 0 computes on the server's event loop.
    queue : int
        Calculation requests that may wait for a slot; one more is refused at once.
    budget_s : float
        Longest a request may wait from arrival for a slot [s]; past it, 503.
    client_timeout_s : float
        Longest a client may take to send its body, from arrival [s]; past it, 408.
    retry_after_s : int
        Seconds sent in ``Retry-After`` with every refusal.
    switch_interval_s : float
        Interpreter switch interval set when the first slot thread starts [s].
    """

    slots: int
    queue: int
    budget_s: float
    client_timeout_s: float
    retry_after_s: int
    switch_interval_s: float = 0.001
    metrics: AdmissionMetrics | None = None
    waiting: int = 0
    computing: int = 0
    draining: bool = False
    mean_calc_s: float = 0.0  # moving average of a calculation's duration [s]
    _free: list[SlotThread] = field(default_factory=list)
    _started: int = 0
    _waiters: deque[asyncio.Future[SlotThread | None]] = field(default_factory=deque)

    @property
    def capacity(self) -> int:
        """Calculations that can run at once (at least 1: inline counts as one)."""
        return max(self.slots, 1)

    def saturated(self) -> bool:
        """True while a new calculation would be refused (queue full) or when draining."""
        return self.draining or (self.computing >= self.capacity and self.waiting >= self.queue)

    def begin_draining(self) -> None:
        """Refuse new calculations and report not ready (SIGTERM received)."""
        self.draining = True

    def record(self, seconds: float) -> None:
        """Fold one calculation's duration into the moving average (weight 1/8)."""
        self.mean_calc_s += (seconds - self.mean_calc_s) / 8.0

    def expected_wait_s(self) -> float:
        """The wait a request joining the queue now can expect [s]: the requests ahead of
        it, shared among the slots, at the average duration (0 while a slot is free)."""
        if self.computing < self.capacity:
            return 0.0
        return (self.waiting + 1) * self.mean_calc_s / self.capacity

    def _report(self) -> None:
        if self.metrics is not None:
            self.metrics.queue_changed(self.waiting, self.computing)

    def _take_free(self) -> SlotThread | None:
        if self._free:
            return self._free.pop()
        if self._started < self.slots:
            if self._started == 0:
                # the event loop waits for the interpreter lock after every I/O; a slot
                # thread computing in Python gives it up after this interval (5 ms by default)
                sys.setswitchinterval(self.switch_interval_s)
            self._started += 1
            return SlotThread(f"gearwork-calc-{self._started}")
        return None

    async def acquire(self, deadline: float) -> tuple[bool, SlotThread | None]:
        """``(True, slot)`` once a slot is this request's (``None``: compute inline), or
        ``(False, None)`` past ``deadline``. Waiters are served first come, first served."""
        if self.computing < self.capacity and not self._waiters:
            self.computing += 1
            self._report()
            return True, self._take_free()
        waiter: asyncio.Future[SlotThread | None] = asyncio.get_running_loop().create_future()
        self._waiters.append(waiter)
        try:
            await asyncio.wait({waiter}, timeout=max(deadline - time.monotonic(), 0.0))
        except BaseException:
            if waiter.done() and not waiter.cancelled():
                self.release(waiter.result())  # handed over just as the caller left
            raise
        finally:
            if not waiter.done():
                waiter.cancel()
                self._waiters.remove(waiter)
        if waiter.cancelled():
            return False, None
        return True, waiter.result()  # handed over: ``computing`` already counts it

    def release(self, slot: SlotThread | None) -> None:
        """Hand the slot to the first waiter, else free it (call on the server's loop)."""
        while self._waiters:
            waiter = self._waiters.popleft()
            if not waiter.done():
                waiter.set_result(slot)
                return
        self.computing -= 1
        if slot is not None:
            self._free.append(slot)
        self._report()

    def refuse(self, scope: Scope, detail: str, slug: str = "busy") -> Response:
        """A 503 problem with ``Retry-After``."""
        return problem_response(
            503,
            detail,
            scope.get("path", ""),
            slug=slug,
            headers={"Retry-After": str(self.retry_after_s)},
        )

    async def turn_away(
        self, scope: Scope, send: Send, waited_s: float, outcome: str, detail: str
    ) -> None:
        """Count the wait under ``outcome`` and answer 503 with ``Retry-After``."""
        if self.metrics is not None:
            self.metrics.waited(waited_s, outcome)
        await self.refuse(scope, f"{detail}; retry after {self.retry_after_s} s.")(
            scope, no_body, send
        )

    def busy(self) -> str:
        """Why a full queue refuses, without the retry advice."""
        return f"The service is busy ({self.capacity} computing, {self.queue} waiting)"


class _BodyTimeoutError(Exception):
    pass


def arrival(scope: Scope) -> float:
    """When the request arrived (monotonic clock) [s], as the gate recorded it."""
    state = scope.setdefault("state", {})
    if _ARRIVED not in state:
        state[_ARRIVED] = time.monotonic()
    return float(state[_ARRIVED])


class _AdmissionMiddleware:
    """What both admission middlewares share: the application, the admission state, and
    every request but a calculation passed straight through."""

    def __init__(self, app: ASGIApp, admission: Admission) -> None:
        self.app = app
        self.admission = admission

    async def __call__(self, scope: Scope, receive: Receive, send: Send) -> None:
        if not is_calculation(scope):
            await self.app(scope, receive, send)
            return
        await self.admit(scope, receive, send, arrival(scope))

    async def admit(self, scope: Scope, receive: Receive, send: Send, arrived: float) -> None:
        """Handle a calculation request that arrived at ``arrived`` (monotonic) [s]."""
        raise NotImplementedError


class AdmissionGate(_AdmissionMiddleware):
    """Refuse at once when draining or the queue is full; bound the time to send a body."""

    async def admit(self, scope: Scope, receive: Receive, send: Send, arrived: float) -> None:
        adm = self.admission
        if adm.draining or adm.saturated():
            reason = "draining" if adm.draining else "queue_full"
            detail = "This worker is shutting down" if adm.draining else adm.busy()
            await adm.turn_away(scope, send, 0.0, reason, detail)
            return
        deadline = arrived + adm.client_timeout_s
        timed_out = False
        started = False

        async def timed_receive() -> Message:
            nonlocal timed_out
            try:
                # the loop's clock is time.monotonic, the clock ``deadline`` is on
                async with asyncio.timeout_at(deadline):
                    return await receive()
            except TimeoutError:
                timed_out = True
                raise _BodyTimeoutError from None

        async def tracked_send(message: Message) -> None:
            nonlocal started
            if message["type"] == "http.response.start":
                started = True
            await send(message)

        with contextlib.suppress(_BodyTimeoutError):
            await self.app(scope, timed_receive, tracked_send)
        if timed_out and not started:
            if adm.metrics is not None:
                adm.metrics.waited(time.monotonic() - arrived, "body_timeout")
            response = problem_response(
                408,
                f"The request body did not arrive within {adm.client_timeout_s:g} s.",
                scope.get("path", ""),
                slug="request-timeout",
                headers={"Connection": "close"},
            )
            await response(scope, no_body, send)


class CalculationSlots(_AdmissionMiddleware):
    """Wait for a calculation slot within the budget, then compute on the slot's thread."""

    async def admit(self, scope: Scope, receive: Receive, send: Send, arrived: float) -> None:
        adm = self.admission
        body = await read_body(receive)
        if body is None:
            return  # the client went away
        if adm.computing >= adm.capacity and adm.waiting >= adm.queue:
            await adm.turn_away(scope, send, time.monotonic() - arrived, "queue_full", adm.busy())
            return
        if time.monotonic() - arrived + adm.expected_wait_s() > adm.budget_s:
            detail = f"The wait for a calculation slot would exceed {adm.budget_s:g} s"
            await adm.turn_away(scope, send, time.monotonic() - arrived, "budget", detail)
            return
        adm.waiting += 1
        adm._report()
        try:
            admitted, slot = await adm.acquire(arrived + adm.budget_s)
        finally:
            adm.waiting -= 1
            adm._report()
        waited = time.monotonic() - arrived
        if not admitted:
            detail = f"No calculation slot came free within {adm.budget_s:g} s"
            await adm.turn_away(scope, send, waited, "budget", detail)
            return
        if adm.metrics is not None:
            adm.metrics.waited(waited, "admitted")
        await self._compute(scope, body, send, slot)

    async def _compute(
        self, scope: Scope, body: bytes, send: Send, slot: SlotThread | None
    ) -> None:
        adm = self.admission
        replay = replayed(body)
        started = time.monotonic()
        if slot is None:
            try:
                await self._checked(scope, body, replay, send)
            finally:
                adm.record(time.monotonic() - started)
                adm.release(None)
            return
        out: list[Message] = []

        async def collect(message: Message) -> None:
            out.append(message)

        loop = asyncio.get_running_loop()
        finished: asyncio.Future[BaseException | None] = loop.create_future()

        def done(error: BaseException | None) -> None:
            def on_loop() -> None:
                adm.record(time.monotonic() - started)
                adm.release(slot)
                if not finished.done():
                    finished.set_result(error)

            loop.call_soon_threadsafe(on_loop)

        slot.run(lambda: self._checked(scope, body, replay, collect), done)
        error = await finished
        if error is not None:
            raise error
        for message in out:
            await send(message)

    async def _checked(self, scope: Scope, body: bytes, receive: Receive, send: Send) -> None:
        """The application, unless the JSON body holds an object with too many fields."""
        kind = dict(scope.get("headers", [])).get(b"content-type", b"application/json")
        crowded = crowded_object(body) if b"json" in kind.lower() else None
        if crowded is None:
            await self.app(scope, receive, send)
            return
        where, count = crowded
        response = problem_response(
            422,
            f"`{where}` has {count} fields; no request object has more than "
            f"{MAX_OBJECT_FIELDS} (unknown fields are refused).",
            scope.get("path", ""),
            field=where,
        )
        await response(scope, receive, send)
