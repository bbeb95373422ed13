"""Set profiles: the model and its readers, the typical values and the tube table.

The names below are re-exported from :mod:`faultwise.profile.model` and
:mod:`faultwise.profile.load` so that the old
``from faultwise.profile import ...`` keeps working; code inside faultwise imports the
submodules directly.
"""

from __future__ import annotations

from faultwise.profile.load import load_profile, profile_from_dict
from faultwise.profile.model import (CIRCUITS, FAMILIES, MATERIALS, OUTPUT_ROLES, POLARITIES,
                                     RECTIFIERS, TRANSISTOR_ROLES, TUBE_ROLES, Audio, Bias, Profile,
                                     Supply, Transistor, Tube, profile_to_dict)

__all__ = [
    "Audio",
    "Bias",
    "CIRCUITS",
    "FAMILIES",
    "MATERIALS",
    "OUTPUT_ROLES",
    "POLARITIES",
    "Profile",
    "RECTIFIERS",
    "Supply",
    "TRANSISTOR_ROLES",
    "TUBE_ROLES",
    "Transistor",
    "Tube",
    "load_profile",
    "profile_from_dict",
    "profile_to_dict",
]
