"""Element-wise formulas evaluated a block of elements at a time.

A formulation that builds an array per element (a series' terms, an isotherm sampled on a grid)
needs memory in proportion to elements times that array; taken a block at a time, a call needs
only its inputs, its outputs and one block's work, whatever its size. Each element goes through
the same arithmetic whichever block holds it, so a scalar and the same value inside an array
agree to the last bit.

>>> sums, products = in_blocks(lambda a, b: (a + b, a * b), np.arange(5.0), 2.0, block=2)
>>> sums.tolist(), products.tolist()
([2.0, 3.0, 4.0, 5.0, 6.0], [0.0, 2.0, 4.0, 6.0, 8.0])
"""

from __future__ import annotations

from typing import Callable, Sequence

import numpy as np
from numpy.typing import ArrayLike

from ..result import broadcast


def in_blocks(fn: Callable[..., Sequence[np.ndarray]], *arrays: ArrayLike, block: int) -> tuple[np.ndarray, ...]:
    """``fn`` on successive blocks of at most ``block`` elements of ``arrays`` (float, broadcast
    against each other, flattened); its results, one array per element of the block each, put
    together in the broadcast shape."""
    whole_arrays = broadcast(*(np.asarray(a, dtype=float) for a in arrays))
    shape = whole_arrays[0].shape
    flat = [a.reshape(-1) for a in whole_arrays]
    size = flat[0].size
    if size <= block:  # one block (a single cell, for one): its results are the answer
        return tuple(np.asarray(part).reshape(shape) for part in fn(*flat))
    first = fn(*(a[:block] for a in flat))
    out = [np.empty(size, dtype=np.result_type(part)) for part in first]
    for whole, part in zip(out, first):
        whole[:block] = part
    for start in range(block, size, block):
        for whole, part in zip(out, fn(*(a[start:start + block] for a in flat))):
            whole[start:start + block] = part
    return tuple(whole.reshape(shape) for whole in out)
