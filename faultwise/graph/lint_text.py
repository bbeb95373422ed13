"""Lint rules on what nodes say: placeholders and words of another family.

``placeholders``: every ``{name|fallback}`` in a node's text names an expectation its
families have (see :mod:`faultwise.graph.node_text`).

``family_words``: a node shown to several families must not tell one family about another:
"series-string" or "live chassis" in a text a transformer-set walk shows, "battery" in a
tube-set walk, "tube" or "heater" in a transistor walk. Each text is checked as the family
sees it (after its ``text_by_family`` variant), so the fix is a variant or neutral words.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from faultwise.graph.lint_run import LintRun
    from faultwise.graph.nodes import Node

WORD_GROUPS = {
    # words -> the families whose walks may show them
    "series-string set": (("series-string", "series string", "series-heater", "live chassis",
                           "hot chassis", "ac/dc", "heater string", "dropping resistor",
                           "ballast"), ("series-string",)),
    "transformer set": (("power transformer", "transformer set", "transformer sets",
                         "high-voltage winding", "hv winding", "heater winding", "5y3"),
                        ("transformer",)),
    "tube set": ((r"tubes?", "valves?", "heaters?", "plates?", "b\\+", "filament"),
                 ("series-string", "transformer")),
    "transistor set": (("battery", "batteries", "transistors?", "emitter", "collector",
                        "germanium", "silicon transistor"), ("transistor",)),
}


def _compiled():
    out = []
    for group, (words, owners) in WORD_GROUPS.items():
        pattern = re.compile(r"(?<![\w-])(" + "|".join(words) + r")(?![\w-])", re.IGNORECASE)
        out.append((group, pattern, owners))
    return out


def family_word_hits(node: Node) -> list[tuple[str, str, str]]:
    """(family shown to, word found, group) for every foreign family word in the node."""
    from faultwise.graph.node_text import texts_of

    hits = []
    if len(node.families) < 2:
        return hits
    groups = _compiled()
    for family in node.families:
        text = " ".join(texts_of(node, family))
        for group, pattern, owners in groups:
            if family in owners:
                continue
            m = pattern.search(text)
            if m:
                hits.append((family, m.group(1), group))
    return hits


def text_rules(run: LintRun) -> None:
    """Run both rules on a lint run (:class:`faultwise.graph.lint_run.LintRun`)."""
    from faultwise.graph.node_text import placeholders

    for node in run.k.nodes.values():
        for family, word, group in family_word_hits(node):
            run.at(node, f"a {family} walk shows '{word}', a word of the {group}",
                   "write family-neutral text, or give that family its own text with "
                   f"'text_by_family: {{{family}: {{...}}}}'")
        if run.known is None:
            continue
        for name in placeholders(node):
            missing = [f for f in node.families if not run.known[f](name)]
            if len(missing) == len(node.families):
                run.at(node, f"the text refers to the unknown expectation '{{{name}}}'",
                       "use an expectation name (faultwise expect PROFILE lists them)")
