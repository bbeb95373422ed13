"""The expected readings of a set profile, with tolerance bands and the arithmetic shown.

The names below are re-exported from :mod:`faultwise.expect.expected` so that the old
``from faultwise.expect import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.expect.expected import STAGES, Expected, expect, expectation_names

__all__ = [
    "Expected",
    "STAGES",
    "expect",
    "expectation_names",
]
