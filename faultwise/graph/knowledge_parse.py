"""The knowledge folder's other files: ``symptoms.yaml``, ``cautions.yaml``, ``learned.yaml``.

Each problem is reported located (file, line, node, key) into the loader's
:class:`faultwise.graph.reader.Problems`.
"""

from __future__ import annotations

from pathlib import Path
from types import MappingProxyType

from faultwise.graph.reader import ID_RE, KnowledgeReader, Problems, key_line, read_yaml
from faultwise.graph.nodes import FAMILIES, Caution, Learned, Located, Symptom

SYMPTOMS_FORMAT = "faultwise-symptoms/1"
CAUTIONS_FORMAT = "faultwise-cautions/1"
LEARNED_FORMAT = "faultwise-learned/1"
DEFAULT_PRIOR_STRENGTH = 10.0

SYMPTOM_KEYS = frozenset(("id", "title", "families", "entry", "phrasings"))
CAUTION_KEYS = frozenset(("id", "title", "text", "families", "concern"))
SETTINGS_KEYS = frozenset(("prior_strength",))


def _top(path: Path, fmt: str, list_key: str, problems: Problems, required: bool = True):
    """The list under ``list_key`` of a top-level file, checked for its format line."""
    file = str(path)
    if not path.is_file():
        if required:
            problems.add(f"the knowledge folder has no {path.name}", file=file,
                         hint=f"create it with 'format: {fmt}' and '{list_key}:'")
        return None, []
    data = read_yaml(path, problems)
    if data is None:
        return None, []
    if not isinstance(data, dict):
        problems.add(f"{path.name} must be a mapping", file=file, line=1,
                     hint=f"start it with 'format: {fmt}'")
        return None, []
    if data.get("format") != fmt:
        problems.add(f"the file does not declare 'format: {fmt}'", file=file,
                     line=key_line(data, "format") or 1, hint=f"write 'format: {fmt}' at the top")
    items = data.get(list_key)
    if items is None:
        items = []
    if not isinstance(items, list):
        problems.add(f"'{list_key}' must be a list", file=file, line=key_line(data, list_key),
                     hint="write one '- id: ...' per entry")
        items = []
    return data, items


def _item_reader(raw: object, file: str, what: str, index: int, line: int | None,
                 problems: Problems) -> tuple[KnowledgeReader | None, str | None]:
    if not isinstance(raw, dict):
        problems.add(f"{what} {index + 1} is not a mapping", file=file, line=line,
                     hint="write '- id: ...' with its fields indented")
        return None, None
    item_id = raw.get("id")
    r = KnowledgeReader(raw, file, item_id if isinstance(item_id, str) else None, problems)
    if not isinstance(item_id, str) or not ID_RE.match(item_id):
        r.bad("id" if "id" in raw else None, f"{what} {index + 1} needs an 'id' of lower-case "
              "letters, digits and '-'", "add 'id: some-name'")
        return None, None
    return r, item_id


def _entry(r: KnowledgeReader, families: tuple[str, ...]) -> dict[str, str]:
    raw = r.raw.get("entry")
    if isinstance(raw, str) and raw.strip():
        return {f: raw.strip() for f in families}
    if isinstance(raw, dict):
        out = {}
        for family, target in raw.items():
            line = key_line(raw, family)
            if family not in FAMILIES:
                r.p.add(f"unknown family {family!r} in 'entry'", file=r.file, line=line,
                        node=r.node, key="entry", hint="use " + ", ".join(FAMILIES))
            elif not isinstance(target, str) or not target.strip():
                r.p.add(f"the entry for {family} must be a node id", file=r.file, line=line,
                        node=r.node, key="entry", hint="write 'family: node-id'")
            else:
                out[family] = target.strip()
        return out
    r.bad("entry" if "entry" in r.raw else None,
          "the symptom needs an 'entry': a node id, or a mapping family -> node id",
          "add 'entry: supply.some-check'")
    return {}


def read_symptoms(path: Path, problems: Problems) -> tuple[dict[str, Symptom], float]:
    file = str(path)
    data, items = _top(path, SYMPTOMS_FORMAT, "symptoms", problems)
    strength = DEFAULT_PRIOR_STRENGTH
    if data is not None:
        r = KnowledgeReader(data, file, None, problems)
        r.unknown_keys(frozenset(("format", "symptoms", "settings")), "symptoms.yaml")
        settings = r.mapping("settings")
        if settings is not None:
            s = KnowledgeReader(settings, file, None, problems)
            s.unknown_keys(SETTINGS_KEYS, "settings")
            value = s.number("prior_strength", DEFAULT_PRIOR_STRENGTH)
            if value is not None and value > 0:
                strength = value
            else:
                s.bad("prior_strength", "'prior_strength' must be above zero",
                      "write e.g. 'prior_strength: 10'")
    out: dict[str, Symptom] = {}
    for i, raw in enumerate(items):
        r, sid = _item_reader(raw, file, "symptom", i, key_line(items, i), problems)
        if r is None:
            continue
        r.unknown_keys(SYMPTOM_KEYS, "a symptom")
        entry_raw = raw.get("entry")
        default = tuple(f for f in FAMILIES if f in entry_raw) \
            if isinstance(entry_raw, dict) and entry_raw else FAMILIES
        families = r.families(default)
        symptom = Symptom(id=sid, title=r.text("title", required=True), families=families,
                          entry=MappingProxyType(_entry(r, families)),
                          phrasings=r.texts("phrasings"), where=Located(file, r.line() or 0))
        if sid in out:
            r.bad("id", f"the symptom id '{sid}' appears twice",
                  f"the first is at line {out[sid].where.line}; keep one")
            continue
        out[sid] = symptom
    return out, strength


def read_cautions(path: Path, problems: Problems) -> dict[str, Caution]:
    file = str(path)
    data, items = _top(path, CAUTIONS_FORMAT, "cautions", problems)
    if data is not None:
        KnowledgeReader(data, file, None, problems).unknown_keys(
            frozenset(("format", "cautions")), "cautions.yaml")
    out: dict[str, Caution] = {}
    for i, raw in enumerate(items):
        r, cid = _item_reader(raw, file, "caution", i, key_line(items, i), problems)
        if r is None:
            continue
        r.unknown_keys(CAUTION_KEYS, "a caution")
        caution = Caution(id=cid, title=r.text("title", required=True),
                          text=r.text("text", required=True), families=r.families(FAMILIES),
                          where=Located(file, r.line() or 0), concern=r.text("concern"))
        if cid in out:
            r.bad("id", f"the caution id '{cid}' appears twice",
                  f"the first is at line {out[cid].where.line}; keep one")
            continue
        out[cid] = caution
    return out


def read_learned(path: Path, problems: Problems) -> Learned:
    if not path.is_file():
        return Learned()
    file = str(path)
    data = read_yaml(path, problems)
    if data is None:
        return Learned()
    if not isinstance(data, dict) or data.get("format") != LEARNED_FORMAT:
        problems.add(f"learned.yaml does not declare 'format: {LEARNED_FORMAT}'", file=file,
                     line=1, hint="regenerate it with 'faultwise review --learn'")
        return Learned()
    r = KnowledgeReader(data, file, None, problems)
    r.unknown_keys(frozenset(("format", "written", "cases", "counts")), "learned.yaml")
    counts: dict = {}
    for symptom, per_family in (r.mapping("counts") or {}).items():
        if not isinstance(per_family, dict):
            problems.add(f"counts for '{symptom}' must be a mapping family -> counts",
                         file=file, line=key_line(data["counts"], symptom),
                         hint="regenerate it with 'faultwise review --learn'")
            continue
        fam_out = {}
        for family, per_fault in per_family.items():
            if family not in FAMILIES or not isinstance(per_fault, dict):
                problems.add(f"bad family entry {family!r} under '{symptom}'", file=file,
                             line=key_line(per_family, family),
                             hint="regenerate it with 'faultwise review --learn'")
                continue
            good = {}
            for fault, n in per_fault.items():
                if not isinstance(fault, str) or not isinstance(n, int) or isinstance(n, bool) \
                        or n < 0:
                    problems.add(f"count for {fault!r} must be a whole number", file=file,
                                 line=key_line(per_fault, fault),
                                 hint="regenerate it with 'faultwise review --learn'")
                    continue
                good[fault] = n
            fam_out[family] = MappingProxyType(good)
        counts[str(symptom)] = MappingProxyType(fam_out)
    cases = data.get("cases", 0)
    return Learned(counts=MappingProxyType(counts),
                   cases=cases if isinstance(cases, int) and not isinstance(cases, bool) else 0,
                   written=str(data.get("written") or ""))

