"""Review records — the public names of :mod:`reviewer.records`, kept importable from here.

The records live in the package :mod:`reviewer.records` (chain, signatures and policy,
verification, staleness, actions); this module re-exports its public names.
"""

from __future__ import annotations

from reviewer.records import *  # noqa: F403
from reviewer.records import __all__ as _names

__all__ = list(_names)
