"""pyHanko's synchronous calls start an event loop of their own (``asyncio.run``), which
Python refuses in a thread where a loop is already running: under an ASGI server, or beside
a browser driver's loop in the tests. There the call goes to a short-lived thread instead."""

from __future__ import annotations

import asyncio
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from typing import TypeVar

T = TypeVar("T")


def outside_running_loop(fn: Callable[..., T], *args, **kwargs) -> T:
    """fn(*args, **kwargs), in this thread when no event loop runs here, else in another.
    Only for work that touches no database connection (those are per thread)."""
    try:
        asyncio.get_running_loop()
    except RuntimeError:
        return fn(*args, **kwargs)
    with ThreadPoolExecutor(max_workers=1) as pool:
        return pool.submit(fn, *args, **kwargs).result()
