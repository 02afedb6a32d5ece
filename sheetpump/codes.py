"""Trade vocabularies shared by the readers and the checks: ISO 4406 cleanliness codes and the words
for a shaft's direction of rotation, each defined once.

A cleanliness code (ISO 4406) is three scale numbers for the particles of at least 4, 6 and 14 µm(c) per
millilitre, ``18/16/13``; the first may be left out (``16/13``) or written ``-`` when counted with a
microscope, and ``*`` stands for a number not counted. A direction of rotation is seen from the shaft
end: ``clockwise``, ``counter-clockwise`` or ``either`` (a reversible pump); the trade's other spellings
(``cw``, ``right-hand``, ``anticlockwise``, ``bidirectional`` ...) mean the same.

>>> cleanliness_parts(" 18 / 16 / 13 "), cleanliness_numbers("-/15/12"), cleanliness_numbers("16/13")
(('18', '16', '13'), (None, 15, 12), (None, 16, 13))
>>> rotation_word("Right hand"), rotation_word("CCW"), rotation_word("sideways")
('clockwise', 'counter-clockwise', None)
"""

from __future__ import annotations

import re

from .errors import InputError, Where

__all__ = [
    "ROTATIONS", "cleanliness_code", "cleanliness_numbers", "cleanliness_parts", "cleanliness_text", "rotation",
    "rotation_word",
]

#: The three directions of rotation (seen from the shaft end), as sheetpump writes them.
ROTATIONS = ("clockwise", "counter-clockwise", "either")

_SCALE = r"(\d{1,2}|-|\*)"  # one scale number of ISO 4406, or '-' / '*' for one not given
_CLEANLINESS = re.compile(rf"^\s*(?:{_SCALE}\s*/\s*)?{_SCALE}\s*/\s*{_SCALE}\s*$")

# Every spelling of the trade (lower case, '-' between words) -> the word of ROTATIONS it means.
_ROTATION_WORDS = {
    **dict.fromkeys(("clockwise", "cw", "right", "right-hand", "r"), "clockwise"),
    **dict.fromkeys(("counter-clockwise", "counterclockwise", "anticlockwise", "anti-clockwise", "ccw",
                     "left", "left-hand", "l"), "counter-clockwise"),
    **dict.fromkeys(("either", "both", "reversible", "bidirectional", "bi-directional"), "either"),
}


def cleanliness_parts(code: object) -> tuple[str, ...] | None:
    """The scale numbers of an ISO 4406 code as written (two or three), or ``None`` if it is not one.

    >>> cleanliness_parts("-/15/12"), cleanliness_parts("NAS 7")
    (('-', '15', '12'), None)

    References: ISO 4406 (code of three scale numbers; the first may be left out for a microscope count).
    """
    match = _CLEANLINESS.match(str(code))
    if not match:
        return None
    return tuple(g for g in match.groups() if g is not None)


def cleanliness_numbers(code: object) -> tuple[int | None, int | None, int | None] | None:
    """An ISO 4406 code as three scale numbers (≥4, ≥6, ≥14 µm(c)), ``None`` for a number not given
    (``-``, ``*`` or a two-number code's first); ``None`` if the text is not a code.

    >>> cleanliness_numbers("18/16/13"), cleanliness_numbers("*/16/13"), cleanliness_numbers("clean")
    ((18, 16, 13), (None, 16, 13), None)

    References: ISO 4406 (a two-number code gives the ≥6 and ≥14 µm(c) numbers).
    """
    parts = cleanliness_parts(code)
    if parts is None:
        return None
    nums = [None if p in ("-", "*") else int(p) for p in parts]
    if len(nums) == 2:
        nums.insert(0, None)
    return nums[0], nums[1], nums[2]


def rotation_word(text: object) -> str | None:
    """The direction of rotation a text means (one of :data:`ROTATIONS`), or ``None`` if none.

    Case, spaces and underscores between words do not matter (``"Left hand"`` is ``left-hand``).

    >>> rotation_word("anti_clockwise"), rotation_word("both")
    ('counter-clockwise', 'either')

    References: common practice (direction of rotation seen from the shaft end).
    """
    key = str(text).strip().lower().replace("_", "-").replace(" ", "-")
    return _ROTATION_WORDS.get(key)


def _not_a_code(code: object, where: Where | None) -> InputError:
    return InputError(f"{str(code)!r} is not an ISO 4406 cleanliness code", where or Where(),
                      "write two or three scale numbers such as '18/16/13'")


def cleanliness_text(code: object, where: Where | None = None) -> str:
    """An ISO 4406 code as sheetpump writes it (its scale numbers joined by ``/``), refusing a text that is
    not a code (naming ``where``).

    >>> cleanliness_text(" 18 / 16 / 13 "), cleanliness_text("-/15/12")
    ('18/16/13', '-/15/12')
    """
    parts = cleanliness_parts(code)
    if parts is None:
        raise _not_a_code(code, where)
    return "/".join(parts)


def cleanliness_code(code: object, where: Where | None = None) -> tuple[int | None, int | None, int | None]:
    """:func:`cleanliness_numbers` of ``code``, refusing a text that is not an ISO 4406 code (naming ``where``).

    >>> cleanliness_code("16/13")
    (None, 16, 13)
    >>> cleanliness_code("NAS 7", Where(cell="B30"))
    Traceback (most recent call last):
    ...
    sheetpump.errors.InputError: B30: 'NAS 7' is not an ISO 4406 cleanliness code (write two or three ...
    """
    numbers = cleanliness_numbers(code)
    if numbers is None:
        raise _not_a_code(code, where)
    return numbers


def rotation(text: object, where: Where | None = None) -> str:
    """:func:`rotation_word` of ``text``, refusing a text that names no direction of rotation (naming ``where``).

    >>> rotation("CW")
    'clockwise'
    """
    word = rotation_word(text)
    if word is None:
        raise InputError(f"{str(text)!r} is not a direction of rotation", where or Where(),
                         "write 'clockwise', 'counter-clockwise' or 'either' (seen from the shaft end)")
    return word
