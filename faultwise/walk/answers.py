"""The answers file of a scripted walk (``faultwise walk --answers FILE``), read and checked.

The file (YAML) has ``readings`` keyed by expectation name (a number in the expectation's
unit, a string with a unit such as "58 V", or one of absent/low/normal/high) and
``observations`` keyed by check id (a choice each; YAML's yes/no booleans are read as the
choices "yes" and "no"). Every problem is an InputError naming file, line and key with a
hint: a file that is not a mapping, an unknown top-level key, a name the set has no
expectation for, a reading that does not parse in its unit, an id that is not an
observation check, a choice the check does not offer. What it returns is what
:func:`faultwise.walk.scripted.auto_walk` takes.
"""

from __future__ import annotations

import os
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from faultwise.core.errors import FaultwiseError, InputError
from faultwise.core.units import parse_reading
from faultwise.core.yamlload import line_of, load_yaml_file
from faultwise.expect.context import Expected
from faultwise.graph.knowledge import Knowledge
from faultwise.graph.nodes import MEASURE_OUTCOMES, Check

ANSWER_KEYS = ("readings", "observations")


def load_answers(path: str | os.PathLike[str], knowledge: Knowledge,
                 expectations: Mapping[str, Expected]
                 ) -> tuple[dict[str, Any], dict[str, str]]:
    """Read and check an answers file: (readings by name, observations by check id).

    InputError names file, line and key of a problem.
    """
    file = str(path)
    try:
        data = load_yaml_file(Path(path))
    except FaultwiseError as exc:
        raise InputError(exc.message, file=exc.file or file, line=exc.line, key=exc.key,
                         hint=exc.hint) from None
    if data is None:
        data = {}
    if not isinstance(data, dict):
        raise InputError("the answers file must be a mapping", file=file, line=1,
                         hint="write 'readings:' and 'observations:' sections")
    for key in data:
        if key not in ANSWER_KEYS:
            raise InputError(f"unknown key '{key}' in the answers file", file=file,
                             line=line_of(data, key), key=str(key),
                             hint="use only readings and observations")
    readings: dict[str, Any] = {}
    raw = _section(data, "readings", file, "write 'expectation.name: value' lines under it")
    for name, value in raw.items():
        line = line_of(raw, name)
        if name not in expectations:
            raise InputError(f"unknown expectation name '{name}' for this set", file=file,
                             line=line, key=str(name),
                             hint="run 'faultwise expect PROFILE' to list the names")
        unit = expectations[name].unit
        if isinstance(value, bool) or value is None or isinstance(value, (list, dict)):
            raise InputError(f"the reading for '{name}' must be a number or a value with a unit",
                             file=file, line=line, key=str(name), hint=f"write e.g. '{name}: 12 {unit}'")
        if isinstance(value, str) and value.strip() not in MEASURE_OUTCOMES:
            try:
                parse_reading(value, unit)
            except InputError as exc:
                raise InputError(exc.message, file=file, line=line, key=str(name),
                                 hint=exc.hint) from None
        readings[str(name)] = value.strip() if isinstance(value, str) else value
    observations: dict[str, str] = {}
    raw = _section(data, "observations", file, "write 'check-id: choice' lines under it")
    for check_id, choice in raw.items():
        line = line_of(raw, check_id)
        node = knowledge.nodes.get(check_id)
        if not isinstance(node, Check) or node.is_measurement:
            raise InputError(f"'{check_id}' is not an observation check of the knowledge",
                             file=file, line=line, key=str(check_id),
                             hint="give measurements under readings by expectation name")
        if isinstance(choice, bool):   # YAML reads yes/no as booleans
            choice = "yes" if choice else "no"
        if not isinstance(choice, str) or choice not in node.choices:
            raise InputError(f"'{choice}' is not a choice of '{check_id}'", file=file, line=line,
                             key=str(check_id), hint="use one of " + ", ".join(node.choices))
        observations[str(check_id)] = choice
    return readings, observations


def _section(data: dict, key: str, file: str, hint: str) -> dict:
    """One section of the answers file (absent or empty: nothing); not a mapping: located error."""
    raw = data.get(key) or {}
    if not isinstance(raw, dict):
        raise InputError(f"'{key}' must be a mapping", file=file, line=line_of(data, key),
                         key=key, hint=hint)
    return raw
