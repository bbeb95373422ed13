"""What a node says to one set: per-family text variants and set-computed values in text.

Two mechanisms, both resolved when the walk shows a node (:func:`for_set`):

``text_by_family``: a node shown to more than one family may carry, per family, the fields
that family should read instead::

    text_by_family:
      transformer: {why: "...", choices: {stays: "..."}}

Allowed fields: check ``title, how, why, choices`` (labels only, same names);
suspects ``title, why``; fault ``title, repair, parts, notes, plain``; escalate
``title, advice``.

Placeholders: ``{parts.filter_cap_v|the original rating}`` in any text is replaced by that
expectation of this set ("250 V"), or by the text after ``|`` when the profile does not
give what the value needs. Lint checks that every placeholder names a known expectation.
"""

from __future__ import annotations

import dataclasses
import re
from types import MappingProxyType
from typing import TYPE_CHECKING, Mapping, TypeVar

from faultwise.graph.nodes import Check, Escalate, Fault, Node, Suspects

if TYPE_CHECKING:
    from faultwise.expect.context import Expected
    from faultwise.graph.reader import KnowledgeReader

VARIANT_FIELDS = {
    "check": ("title", "how", "why", "choices"),
    "suspects": ("title", "why"),
    "fault": ("title", "repair", "parts", "notes", "plain"),
    "escalate": ("title", "advice"),
}
LIST_FIELDS = ("repair", "parts")
N = TypeVar("N", Check, Suspects, Fault, Escalate)
PLACEHOLDER_RE = re.compile(r"\{([a-z][a-z0-9_]*(?:\.[a-z0-9_]+)+)(?:\|([^{}]*))?\}")


def parse_variants(r: KnowledgeReader, kind: str, families: tuple[str, ...],
                   choices: Mapping[str, str] | None = None) -> MappingProxyType:
    """Read ``text_by_family`` of one node (``r``: its KnowledgeReader); problems are located."""
    from faultwise.graph.reader import KnowledgeReader, key_line

    raw = r.mapping("text_by_family")
    out: dict[str, MappingProxyType] = {}
    allowed = VARIANT_FIELDS[kind]
    for family, fields in (raw or {}).items():
        line = key_line(raw, family)
        if family not in families:
            r.p.add(f"text_by_family names '{family}', which this node is not shown to",
                    file=r.file, line=line, node=r.node, key="text_by_family",
                    hint="use one of " + ", ".join(families))
            continue
        if not isinstance(fields, dict):
            r.p.add(f"text_by_family.{family} must be a mapping of fields", file=r.file,
                    line=line, node=r.node, key="text_by_family",
                    hint="write '" + family + ": {why: ...}'")
            continue
        sub = KnowledgeReader(fields, r.file, r.node, r.p)
        sub.unknown_keys(frozenset(allowed), f"text_by_family of a {kind} node")
        got: dict[str, object] = {}
        for name in allowed:
            if not sub.has(name):
                continue
            if name in LIST_FIELDS:
                got[name] = sub.texts(name)
            elif name == "choices":
                labels = sub.mapping("choices") or {}
                bad = [c for c in labels if c not in (choices or {})]
                if bad:
                    sub.bad("choices", f"text_by_family.{family} relabels unknown choice "
                            f"'{bad[0]}'", "relabel only the node's own choices")
                got[name] = MappingProxyType({str(c): str(v).strip() for c, v in labels.items()
                                              if c in (choices or {})})
            else:
                got[name] = sub.text(name)
        out[family] = MappingProxyType(got)
    return MappingProxyType(out)


def fill(text: str, expectations: Mapping | None) -> str:
    """Replace each ``{name|fallback}`` with this set's value of ``name`` (or the fallback)."""
    if "{" not in text:
        return text

    def one(m: re.Match) -> str:
        exp = (expectations or {}).get(m.group(1))
        if exp is None:
            return m.group(2) if m.group(2) is not None else "(not computed for this set)"
        return f"{exp.nominal:g} {exp.unit}"

    return PLACEHOLDER_RE.sub(one, text)


def placeholders(node: Node) -> list[str]:
    """Every expectation name a node's texts refer to (for lint), all variants included."""
    out = []
    for text in texts_of(node, None) + [t for fam in node.variants
                                        for t in texts_of(node, fam)]:
        out += [m.group(1) for m in PLACEHOLDER_RE.finditer(text)]
    return out


def texts_of(node: Node, family: str | None) -> list[str]:
    """The texts a walk of ``family`` shows for this node (None: the base texts)."""
    view = node if family is None else with_family(node, family)
    out = [view.title]
    for name in ("how", "why", "advice", "notes", "plain"):
        value = getattr(view, name, None)
        if value:
            out.append(value)
    for name in LIST_FIELDS:
        out += list(getattr(view, name, ()) or ())
    out += list((getattr(view, "choices", None) or {}).values())
    return out


def with_family(node: N, family: str) -> N:
    """The node with the fields of its ``text_by_family`` entry for ``family`` put in."""
    variant = node.variants.get(family) if node.variants else None
    if not variant:
        return node
    changes = dict(variant)
    if "choices" in changes:
        merged = dict(node.choices)
        merged.update(changes["choices"])
        changes["choices"] = MappingProxyType(merged)
    return dataclasses.replace(node, **changes)


def for_set(node: N | None, family: str, expectations: Mapping[str, Expected] | None) -> N | None:
    """The node as this set's walk shows it: family variant, then placeholders filled."""
    if node is None:
        return None
    view = with_family(node, family)
    changes: dict[str, object] = {}
    for name in ("title", "how", "why", "advice", "notes", "plain"):
        value = getattr(view, name, None)
        if isinstance(value, str) and "{" in value:
            changes[name] = fill(value, expectations)
    for name in LIST_FIELDS:
        value = getattr(view, name, None)
        if value and any("{" in t for t in value):
            changes[name] = tuple(fill(t, expectations) for t in value)
    return dataclasses.replace(view, **changes) if changes else view


def for_case_profile(node: N | None, family: str, profile: Mapping[str, object] | None
                     ) -> N | None:
    """:func:`for_set` for a node read back from a case file's copied profile (reports).

    A profile that no longer loads leaves the placeholders' fallbacks in the text.
    """
    from faultwise.core.errors import FaultwiseError

    expectations = None
    if profile:
        try:
            from faultwise.expect.expected import expect
            from faultwise.profile.load import profile_from_dict

            expectations = expect(profile_from_dict(dict(profile), "<case profile>"))
        except FaultwiseError:
            expectations = None
    return for_set(node, family, expectations)
