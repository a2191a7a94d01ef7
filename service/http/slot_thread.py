"""A calculation slot's thread: a daemon thread running its own asyncio event loop."""

from __future__ import annotations

import asyncio
import contextvars
import threading
from collections.abc import Awaitable, Callable

__all__ = ["SlotThread"]


class SlotThread:
    """A daemon thread running its own asyncio event loop, started on first use."""

    def __init__(self, name: str) -> None:
        self.loop = asyncio.new_event_loop()
        self._thread = threading.Thread(target=self._run, name=name, daemon=True)
        self._thread.start()

    def _run(self) -> None:
        asyncio.set_event_loop(self.loop)
        self.loop.run_forever()

    def run(
        self,
        factory: Callable[[], Awaitable[None]],
        done: Callable[[BaseException | None], None],
    ) -> None:
        """Start ``factory()`` on this thread's loop in the caller's context; call
        ``done(error)`` on this thread when it has finished."""
        context = contextvars.copy_context()

        async def wrapped() -> None:
            await factory()

        def start() -> None:
            task = self.loop.create_task(wrapped(), context=context)

            def finished(t: asyncio.Task[None]) -> None:
                error = None if t.cancelled() else t.exception()
                done(error)

            task.add_done_callback(finished)

        self.loop.call_soon_threadsafe(start)
