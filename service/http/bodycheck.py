"""A cheap look at a JSON body before validation: refuse objects with too many fields.

Every request object has at most a few dozen fields, and unknown fields are refused. A
body of 20,000 unknown keys would otherwise be refused only after the validator has built
20,000 error records (most of a second of CPU). This walk (orjson, then one pass over
the containers) stops at the first object past ``MAX_OBJECT_FIELDS`` and names it.

Every field of a JSON object is followed by a colon, so a body with at most
``MAX_OBJECT_FIELDS`` colons in all (inside strings included) cannot hold a crowded object:
such a body, every ordinary request, is passed after one count of its bytes, unparsed.
"""

from __future__ import annotations

from typing import Any

import orjson

__all__ = ["MAX_OBJECT_FIELDS", "crowded_object"]

MAX_OBJECT_FIELDS = 64  # the largest request object has 19 fields
_MAX_DEPTH = 64


def crowded_object(body: bytes) -> tuple[str, int] | None:
    """(field path, field count) of the first object with more than ``MAX_OBJECT_FIELDS``
    fields, or None (also for a body that is not JSON: validation reports that).

    >>> crowded_object(b'{"a": {' + b",".join(b'"k%d": 0' % i for i in range(70)) + b"}}")
    ('a', 70)
    >>> crowded_object(b'{"a": [1, 2]}') is None, crowded_object(b"not json") is None
    (True, True)
    """
    if body.count(b":") <= MAX_OBJECT_FIELDS:
        return None
    try:
        doc = orjson.loads(body)
    except orjson.JSONDecodeError:
        return None
    stack: list[tuple[Any, str, int]] = [(doc, "", 0)]
    while stack:
        node, path, depth = stack.pop()
        if depth > _MAX_DEPTH:
            continue
        if isinstance(node, dict):
            if len(node) > MAX_OBJECT_FIELDS:
                return path or "body", len(node)
            for key, value in node.items():
                if isinstance(value, dict | list):
                    stack.append((value, f"{path}.{key}" if path else str(key), depth + 1))
        elif isinstance(node, list):
            for i, value in enumerate(node):
                if isinstance(value, dict | list):
                    stack.append((value, f"{path}[{i}]", depth + 1))
    return None
