"""Stage kinds and their checks, one module per family.

Importing this package registers every stage kind and every check that is built. Each family
module declares its :class:`~reviewer.registry.StageKind` parameters and its
:class:`~reviewer.registry.CheckDef` entries side by side.
"""

from reviewer.stages import (  # noqa: F401
    diac,
    fault,
    gate,
    harmonics,
    oscillator,
    power,
    snubber,
    triac,
    turnoff,
)
