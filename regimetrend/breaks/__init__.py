"""Break detection: where the trend's regime changed, how many times, and how sure we are.

Public: ``detect_breaks`` (see ``detect``) returning a ``BreakSet`` of ``Break`` objects.
Modules: ``costs`` (segment costs from prefix sums), ``exact`` (dynamic programming, PELT),
``kinks`` (searches for kinds whose regimes share coefficients), ``ruptures_cost`` (our cost for
ruptures), ``select`` (number of breaks), ``problem`` / ``search`` (the model per kind),
``result`` (the dataclasses); the tests and intervals live in ``critical``, ``intervals``,
``chow`` and ``cusum``.
"""

from .detect import detect_breaks
from .result import Break, BreakSet, Segment

__all__ = ["detect_breaks", "BreakSet", "Break", "Segment"]
