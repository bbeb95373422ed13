"""Free-text complaint -> symptom ids ranked best first (rapidfuzz).

Both the complaint and each symptom's title and phrasings are normalised the same way:
lower case, punctuation dropped, a small trade synonym table folds the many words for one
thing into one (``buzz``, ``humming`` -> ``hum``), a light suffix strip (``-ing``, ``-ed``,
``-s``), and stop words out. A symptom's score (0-100) is the mean of two parts:

- *phrase*: the best ``token_set_ratio`` blended with ``token_sort_ratio`` of the complaint
  against any one of its phrasings (close wording of a whole phrase);
- *words*: how well each word of the complaint is found among all the words of the
  symptom's phrasings (best ``fuzz.ratio`` per word, below 75 counts as 0), averaged over
  the complaint's words (the words of a complaint spread over several phrasings).

rapidfuzz is imported inside the functions, so importing this module is cheap.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import TYPE_CHECKING, Iterable, Mapping

from faultwise.graph.nodes import Symptom

if TYPE_CHECKING:
    from faultwise.graph.knowledge import Knowledge

# Words that carry no complaint ("the radio", "it is").
STOP_WORDS = frozenset("""
a an and any are as at be been but by can cannot could did do does doing for from get got
had has have he her him his how i if in into is it its just me my of off on one or our out
she so some than that the their them then there these they this those to too up us very was
we were what when where which while who will with would you your set radio thing unit
please customer says said seems really all now still even
""".split())

# Trade synonyms: each word on the right stands for the one on the left.
SYNONYMS = {
    "hum": "hum hums humming hummed buzz buzzes buzzing buzzy drone droning hummy",
    "squeal": "squeal squeals squealing whistle whistles whistling whistled howl howls "
              "howling shriek shrieks shrieking whine whines whining squeak squeaks oscillate "
              "oscillates oscillating",
    "motorboat": "motorboat motorboats motorboating putt putting putts chug chugging "
                 "puttputt",
    "scratch": "scratch scratchy scratches scratching scratched crackle crackles crackling "
               "crackly grate grating gritty",
    "smoke": "smoke smokes smoking smoked smoky burn burns burning burnt burned smell smells "
             "smelly stink stinks fumes",
    "hot": "hot heat overheat overheats overheating overheated scorch scorched "
           "scorching",
    "fade": "fade fades fading faded drift drifts drifting drifted weaker",
    "warm": "warm warms warming warmed warmup heats heated cold",
    "intermittent": "intermittent intermittently sporadic sometimes randomly erratic erratically",
    "weak": "weak weakly faint feeble poor poorly",
    "noise": "noise noisy static hiss hissing hisses rushing frying",
    "station": "station stations channel channels broadcast broadcasts program programs "
               "programme signal signals",
    "distort": "distort distorts distorted distortion garbled garble fuzzy muddy raspy rough "
               "harsh mushy broken tinny",
    "dial": "dial dials pointer needle scale calibration calibrated frequency frequencies "
            "readout",
    "light": "light lights lit lamp lamps glow glows glowing bulb bulbs pilot heaters "
             "filaments",
    "dead": "dead died dies lifeless",
    "repair": "repair repaired repairs fixed fix fixing serviced service servicing recapped "
              "recap recapping replaced replacing restored restoring changed",
    "volume": "volume loudness",
    "control": "control controls knob knobs pot pots potentiometer",
    "quiet": "quiet quietly soft softly low barely",
    "silent": "silent mute muted peep",
    "nothing": "nothing zero none",
}
_CANON = {word: canon for canon, words in SYNONYMS.items() for word in words.split()}
_WORD_RE = re.compile(r"[a-z0-9]+")
WORD_FLOOR = 75      # a word match below this ratio counts as no match


@dataclass(frozen=True)
class Match:
    id: str
    title: str
    score: float

    def to_json(self) -> dict:
        return {"id": self.id, "title": self.title, "score": self.score}


def _stem(word: str) -> str:
    """Strip one common English suffix from longer words (a light stemmer, not Porter's)."""
    for suffix in ("ing", "ed", "es", "s"):
        if len(word) > len(suffix) + 3 and word.endswith(suffix):
            return word[: -len(suffix)]
    return word


def normalise_words(text: str) -> list[str]:
    """Lower case words of the text with synonyms folded, suffixes stripped, stop words out."""
    words = _WORD_RE.findall(text.lower().replace("'", ""))
    out = []
    for word in words:
        if word in STOP_WORDS:
            continue
        canon = _CANON.get(word) or _CANON.get(_stem(word)) or _stem(word)
        out.append(canon)
    return out


def normalise(text: str) -> str:
    """The text as compared: ``normalise_words`` joined by spaces."""
    return " ".join(normalise_words(text))


def _symptom_list(source: Knowledge | Mapping[str, Symptom] | Iterable[Symptom]) -> list[Symptom]:
    symptoms = getattr(source, "symptoms", source)
    if isinstance(symptoms, Mapping):
        return list(symptoms.values())
    return list(symptoms)


def match(text: str, symptoms: "Mapping[str, Symptom] | Iterable[Symptom] | object",
          limit: int | None = None) -> list[Match]:
    """Rank symptoms for a complaint, best first; ``symptoms`` may be a Knowledge."""
    from rapidfuzz import fuzz, process

    items = _symptom_list(symptoms)
    query = normalise(text)
    if not items:
        return []
    if not query:
        ranked = [Match(s.id, s.title, 0.0) for s in items]
        return ranked[:limit] if limit else ranked
    phrases: list[str] = []
    owner: list[int] = []
    vocab: list[set[str]] = []
    for i, s in enumerate(items):
        words: set[str] = set()
        for phrase in (s.title,) + tuple(s.phrasings):
            norm = normalise(phrase)
            if norm:
                phrases.append(norm)
                owner.append(i)
                words.update(norm.split())
        vocab.append(words)
    phrase_best = [0.0] * len(items)
    for phrase, i in zip(phrases, owner):
        score = (0.6 * fuzz.token_set_ratio(query, phrase)
                 + 0.4 * fuzz.token_sort_ratio(query, phrase))
        phrase_best[i] = max(phrase_best[i], score)
    qwords = query.split()
    ranked = []
    for i, s in enumerate(items):
        pool = sorted(vocab[i])
        cover = 0.0
        for word in qwords:
            best = process.extractOne(word, pool, scorer=fuzz.ratio, score_cutoff=WORD_FLOOR)
            cover += best[1] if best else 0.0
        cover /= len(qwords)
        score = round(0.5 * phrase_best[i] + 0.5 * cover, 1)
        ranked.append((score, -i, Match(s.id, s.title, score)))
    ranked.sort(key=lambda t: (t[0], t[1]), reverse=True)
    out = [m for _, _, m in ranked]
    return out[:limit] if limit else out
