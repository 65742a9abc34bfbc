"""How deeply a TOML text nests, found by a cheap scan before the TOML reader sees it.

Python's TOML reader recurses once per level of nested arrays and inline tables, and
copying a table recurses once per level of dotted keys, so a file 500 levels deep ends
in a RecursionError. A drum file needs three levels at most (``[head]``, a key, a list
of lug pitches); :func:`check_nesting` refuses anything deeper than :data:`MAX_DEPTH`
in one line, before any of it is parsed.
"""

from __future__ import annotations

from .errors import InputError

MAX_DEPTH = 16  # levels of brackets, braces or dotted-key parts; common practice, no source


def nesting_depth(text: str) -> int:
    """The deepest nesting in a TOML text: brackets and braces of values, parts of dotted keys.

    Comments and the insides of strings (all four TOML kinds) are skipped. The text need
    not be valid TOML; the scan only bounds what the reader would have to recurse through.

    Parameters
    ----------
    text : str
        The file's text.

    Returns
    -------
    int
        The larger of the deepest value nesting (``[[[1]]]`` is 3) and the most parts of
        a key or table header (``a.b.c = 1`` is 3, ``[x.y]`` is 2), plus the header's parts
        for a key below a header.
    """
    deepest = 0
    stack: list[str] = []   # open '[' and '{' of values
    at_key = True           # reading a key (line start, after '{' or a ',' in an inline table)
    header_parts = 0        # parts of the last [table] header
    parts = 1               # parts of the key being read
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if c == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        if c in "\"'":
            i = _skip_string(text, i)
            continue
        if c == "\n":
            if not stack:
                at_key, parts = True, 1
        elif at_key:
            if c == "[" and not stack:            # a [table] or [[array of tables]] header
                j = i
                header_parts = 1
                while j < n and text[j] not in "\n":
                    if text[j] in "\"'":
                        j = _skip_string(text, j)
                        continue
                    if text[j] == ".":
                        header_parts += 1
                    elif text[j] == "#":
                        break
                    j += 1
                deepest = max(deepest, header_parts)
                i = j
                continue
            if c == ".":
                parts += 1
            elif c == "=":
                at_key = False
                deepest = max(deepest, header_parts + len(stack) + parts)
            elif c == "}" and stack:              # an empty inline table {}
                stack.pop()
                at_key = False
        else:
            if c in "[{":
                stack.append(c)
                deepest = max(deepest, len(stack) + header_parts)
                if c == "{":
                    at_key, parts = True, 1
            elif c in "]}":
                if stack:
                    stack.pop()
            elif c == "," and stack and stack[-1] == "{":
                at_key, parts = True, 1
        if deepest > MAX_DEPTH:       # stop early: no need to scan the rest of a hostile file
            return deepest
        i += 1
    return deepest


def _skip_string(text: str, i: int) -> int:
    """Index just past the string starting at ``text[i]`` (a quote), or the end of the text."""
    q = text[i]
    if text.startswith(q * 3, i):
        end, j = q * 3, i + 3
        while True:
            k = text.find(end, j)
            if k < 0:
                return len(text)
            if q == '"' and _escaped(text, k):
                j = k + 1
                continue
            k += 3
            while k < len(text) and text[k] == q:   # up to two quotes may end the content
                k += 1
            return k
    j = i + 1
    while j < len(text):
        ch = text[j]
        if ch == "\n":
            return j
        if q == '"' and ch == "\\":
            j += 2
            continue
        if ch == q:
            return j + 1
        j += 1
    return len(text)


def _escaped(text: str, k: int) -> bool:
    """Whether the quote at ``text[k]`` follows an odd number of backslashes."""
    b = k - 1
    while b >= 0 and text[b] == "\\":
        b -= 1
    return (k - 1 - b) % 2 == 1


def check_nesting(text: str, *, key: str, source: str) -> None:
    """Raise InputError if ``text`` nests deeper than :data:`MAX_DEPTH` levels."""
    depth = nesting_depth(text)
    if depth > MAX_DEPTH:
        raise InputError(key, source, f"nests deeper than {MAX_DEPTH} levels (arrays, inline tables "
                         "or dotted keys); a drum file needs three")
