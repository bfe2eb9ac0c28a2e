"""Improper and singular pieces of an integral, enclosed by proved envelopes.

Between the derivatives and the quadrature on the data path: where the integrand cannot be evaluated at a
finite end (or at a point found inside the interval), or where a limit is infinite, the rules here derive an
envelope of |f| from the formula tree, integrate it in closed form with outward rounding, and hand the
regular rest back to the panels. See ``docs/improper-integrals.md`` for every rule and why it holds.
"""

from ._algebra import Envelope
from ._at_infinity import Growth, InTail, TailEnvelope
from ._near_point import NearPoint, Power
from ._pieces import Piece, end_piece, tail_piece
from ._scalars import Unsupported
from ._shift import shifted

__all__ = [
    "Envelope",
    "Growth",
    "InTail",
    "NearPoint",
    "Piece",
    "Power",
    "TailEnvelope",
    "Unsupported",
    "end_piece",
    "shifted",
    "tail_piece",
]
