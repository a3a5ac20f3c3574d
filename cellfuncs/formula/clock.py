"""The moment and the random numbers the volatile built-ins see (NOW, TODAY, RAND,
RANDBETWEEN, RANDARRAY).

By default the machine's local clock and fresh randomness. Inside :func:`fixed` both are
pinned, so that a recalculation can be repeated exactly (``cellfuncs recalc --now
2024-01-02T08:00 --seed 7``): every call sees the same moment, and the random numbers come
in the same order from the seed.

>>> import datetime as dt
>>> def draw():
...     with fixed(dt.datetime(2024, 1, 2, 6), 7):
...         return now(), generator().random()
>>> draw() == draw(), draw()[0]
(True, datetime.datetime(2024, 1, 2, 6, 0))
"""

from __future__ import annotations

import datetime as dt
from contextlib import contextmanager
from contextvars import ContextVar
from typing import Iterator, NamedTuple

import numpy as np


class _Pinned(NamedTuple):
    moment: dt.datetime | None
    seed: int | None
    random: list[np.random.Generator]  # made on first use: numpy.random takes a while to import


_PINNED: ContextVar[_Pinned | None] = ContextVar("pinned_clock", default=None)
_FRESH: list[np.random.Generator] = []


@contextmanager
def fixed(moment: dt.datetime | None = None, seed: int | None = None) -> Iterator[None]:
    """Within the block NOW is ``moment`` (if given) and the random numbers follow ``seed``
    (if given; else fresh ones)."""
    token = _PINNED.set(_Pinned(moment, seed, []))
    try:
        yield
    finally:
        _PINNED.reset(token)


def now() -> dt.datetime:
    """The moment NOW and TODAY report (local time, no time zone)."""
    pinned = _PINNED.get()
    return pinned.moment if pinned is not None and pinned.moment is not None else dt.datetime.now()


def generator() -> np.random.Generator:
    """Where RAND and its kin take their numbers."""
    pinned = _PINNED.get()
    made = pinned.random if pinned is not None else _FRESH
    if not made:
        made.append(np.random.default_rng(pinned.seed if pinned is not None else None))
    return made[0]
