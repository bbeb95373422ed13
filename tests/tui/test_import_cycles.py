"""No import circle runs through the bench program or the commands.

grimp reads every import of the package, at module level and inside functions alike, and
networkx finds the strongly connected components of that graph (any component of more than
one module is a circle). The domain's own circles are checked with the layers contract.
"""

from __future__ import annotations

import grimp
import networkx as nx

OURS = ("faultwise.tui", "faultwise.commands", "faultwise.cli")


def test_no_import_circle_through_the_tui_or_the_commands():
    graph = grimp.build_graph("faultwise")
    edges = [(m, d) for m in graph.modules if m.startswith("faultwise")
             for d in graph.find_modules_directly_imported_by(m)
             if d.startswith("faultwise") and d != m]
    assert len(edges) > 100                  # the graph was read (the package has hundreds)
    circles = [sorted(c) for c in nx.strongly_connected_components(nx.DiGraph(edges))
               if len(c) > 1 and any(m.startswith(OURS) for m in c)]
    assert circles == []
