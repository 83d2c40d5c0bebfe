"""Limits on what a site file may hold, and reading its JSON within them.

A site file is read whole into memory and every list in it is worked on for
every interval of a year, so each is bounded: a file that is larger, or that
holds more horizon points, obstacles or planes than a site can plausibly
have, is refused with one line before any work is done. The limits are ours,
generous for a real site (common practice, no source), and stated in the
README ("Reporting a problem").
"""

from __future__ import annotations

import json
import os

#: Largest site file read, bytes (a site at every limit below is about 2 MB).
MAX_SITE_FILE_BYTES = 4 * 1024 * 1024
#: Most horizon points (one every 0.1 degree of azimuth).
MAX_HORIZON_POINTS = 3600
#: Most obstacles in one site.
MAX_OBSTACLES = 10_000
#: Most candidate planes in one site.
MAX_PLANES = 50
#: Longest label of an obstacle or plane, characters.
MAX_LABEL_CHARS = 200
#: Longest notes text, characters.
MAX_NOTES_CHARS = 20_000
#: Deepest nesting of arrays and objects in a site file (a site file needs four).
MAX_JSON_DEPTH = 32
#: Most digits of a number in a site file (a float has 17 significant digits).
MAX_NUMBER_DIGITS = 40


class SiteFileTooLarge(ValueError):
    """The file is over :data:`MAX_SITE_FILE_BYTES`."""


def check_file_size(path: str | os.PathLike) -> None:
    """Raise :class:`SiteFileTooLarge` if ``path`` is over the size limit (OSError as is)."""
    size = os.stat(path).st_size
    if size > MAX_SITE_FILE_BYTES:
        raise SiteFileTooLarge(f"is {size / 1e6:.1f} MB; a site file may be at most "
                               f"{MAX_SITE_FILE_BYTES / 1e6:.1f} MB")


class _HugeNumber(float):
    """A number written with more digits than any float holds: infinite, shown as written."""

    def __new__(cls, text: str):
        value = super().__new__(cls, "-inf" if text.startswith("-") else "inf")
        value.text = text
        return value

    def __repr__(self) -> str:
        return f"{self.text[:12]}... ({len(self.text)} characters)"


def _number(text: str, kind):
    # int() of a 5,000-digit text is refused by Python and float() of a 400-digit int
    # overflows: such a number is infinite, so the field's own check names it
    if len(text) > MAX_NUMBER_DIGITS:
        return _HugeNumber(text)
    return kind(text)


def parse_site_json(text: str):
    """Parse a site file's text, refusing what no site file holds.

    A leading UTF-8 byte-order mark is skipped. A number of more than
    :data:`MAX_NUMBER_DIGITS` characters reads as infinite (each field refuses it by
    name, as it refuses ``NaN`` and ``Infinity``); nesting deeper than
    :data:`MAX_JSON_DEPTH` is refused.

    Raises
    ------
    json.JSONDecodeError
        For malformed JSON (with line and column).
    ValueError
        For the refusals above (one sentence, no position).
    """
    text = text.removeprefix("\ufeff")
    # the C parser recurses once per bracket: check the nesting first, without recursion
    if text.count("[") + text.count("{") > MAX_JSON_DEPTH \
            and _depth_outside_strings(text) > MAX_JSON_DEPTH:
        raise ValueError(f"nests arrays or objects more than {MAX_JSON_DEPTH} deep")
    try:
        return json.loads(text, parse_int=lambda t: _number(t, int),
                          parse_float=lambda t: _number(t, float))
    except RecursionError:  # pragma: no cover - the depth check comes first
        raise ValueError(f"nests arrays or objects more than {MAX_JSON_DEPTH} deep") from None


def _depth_outside_strings(text: str) -> int:
    """Deepest bracket nesting of JSON ``text``, ignoring brackets inside strings."""
    opened = deepest = 0
    in_string = escaped = False
    for ch in text:
        if in_string:
            if escaped:
                escaped = False
            elif ch == "\\":
                escaped = True
            elif ch == '"':
                in_string = False
        elif ch == '"':
            in_string = True
        elif ch in "[{":
            opened += 1
            deepest = max(deepest, opened)
            if deepest > MAX_JSON_DEPTH:
                return deepest
        elif ch in "]}":
            opened -= 1
    return deepest


def check_text(value: str) -> str | None:
    """The reason ``value`` cannot be stored as UTF-8 (a lone surrogate), or None."""
    try:
        value.encode("utf-8")
    except UnicodeEncodeError:
        return "holds a character that is not valid Unicode (a lone surrogate)"
    return None
