"""A small memo of factorisations of small designs, keyed by the design's exact bytes.

One analysis factorises the same design many times: the same history at an origin is searched
for every break kind, the linear and exponential shapes share their designs (only the response
differs), and the tests and stability reruns fit break sets already fitted. A factorisation
depends on the design alone, so it is computed once and reused; the key is the design's shape
, layout and a 128-bit digest of its bytes, so a hit returns what the computation would
(results stay identical). Only small designs are kept (``MAX_CELLS``, e.g. 120 monthly points
with up to 50 columns) and at most ``MAX_ENTRIES`` of them, least recently used dropped first
(a few tens of MB at most); the kept arrays are read only.
"""

from __future__ import annotations

import hashlib
import threading
from collections import OrderedDict
from collections.abc import Callable

import numpy as np

MAX_CELLS = 6_000  # designs with more cells are factorised afresh every time
MAX_ENTRIES = 512


class FactorMemo:
    """``get(name, X, compute)``: ``compute(X)`` for this exact design, kept for reuse."""

    def __init__(self, max_entries: int = MAX_ENTRIES, max_cells: int = MAX_CELLS):
        self.max_entries, self.max_cells = max_entries, max_cells
        self._kept: OrderedDict = OrderedDict()
        self._lock = threading.Lock()

    def get(self, name: str, X: np.ndarray, compute: Callable):
        if X.size > self.max_cells or X.dtype != np.float64:
            return compute(X)
        digest = hashlib.blake2b(X.tobytes(order="A"), digest_size=16).digest()
        key = (name, X.shape, X.strides, digest)  # the layout too: BLAS sums by it
        with self._lock:
            found = self._kept.get(key)
            if found is not None:
                self._kept.move_to_end(key)
                return found
        found = compute(X)
        for a in found if isinstance(found, tuple) else (found,):
            if isinstance(a, np.ndarray):
                a.setflags(write=False)
        with self._lock:
            self._kept[key] = found
            while len(self._kept) > self.max_entries:
                self._kept.popitem(last=False)
        return found

    def clear(self) -> None:
        with self._lock:
            self._kept.clear()


FACTORS = FactorMemo()
