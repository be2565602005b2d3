"""``python -m latchbook``: the command line under the name users type.

The code lives in :mod:`reviewer` (I/O and UI) and :mod:`checks` (pure computation); this
package only gives ``python -m`` the same name as the console script.
"""

from reviewer import TOOL

__all__ = ["TOOL"]
