"""How typed text becomes a list of parts, one rule for the bench and for lint.

The bench's parts field takes several parts in one line; the knowledge's suggested parts are
put in it joined by '; ', so each suggested part must come back whole (lint checks that).
"""

from __future__ import annotations


def split_parts(text: str) -> list[str]:
    """'50 uF 160 V electrolytic; 35W4' -> two parts. With a ';' in the text only ';'
    separates (the suggested parts are put in the field that way: their own words may hold
    commas); without one, commas outside brackets do ('8 ohm speaker (65 mm, round), 35W4')."""
    if ";" in text:
        pieces = text.split(";")
    else:
        pieces, depth, start = [], 0, 0
        for i, ch in enumerate(text):
            depth += ch in "([{"
            depth -= ch in ")]}" and depth > 0
            if ch == "," and depth == 0:
                pieces.append(text[start:i])
                start = i + 1
        pieces.append(text[start:])
    return [p.strip(" \t,") for p in pieces if p.strip(" \t,")]


def part_problem(part: str) -> str | None:
    """Why a suggested part would not come back whole from the bench's field, or None.

    A part alone in the field splits at a comma outside brackets; a ';' always splits; an
    unquoted YAML flow list (``parts: [a (b, c)]``) has already split at the comma, leaving
    a bracket open in one item, or an item that starts with 'or'."""
    if part.count("(") != part.count(")"):
        return "its brackets do not pair (a comma in an unquoted [..] list splits the item)"
    if part.lower().startswith("or "):
        return "it starts with 'or' (a comma in an unquoted [..] list split an alternative off)"
    if split_parts(part) != [part.strip()]:
        return "the bench's parts field would split it at a ',' or ';' outside brackets"
    return None
