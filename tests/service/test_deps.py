"""The JSON content-type check against the standard library's MIME header parser."""

from __future__ import annotations

from email.message import Message

import pytest

from service.http.deps import declares_json

HEADERS = [
    "application/json",
    "application/json; charset=utf-8",
    "APPLICATION/JSON",
    "  application/json  ;charset=UTF-8",
    "application/problem+json",
    "application/vnd.api+json; q=1",
    "application/jsonx",
    "application/json/extra",
    "application",
    "application/",
    "/json",
    "text/json",
    "text/plain",
    "multipart/form-data; boundary=x",
    "application/x-www-form-urlencoded",
    "application / json",
    ";application/json",
    "application/json;",
    'application/json; x="a;b"',
]


def _email_says_json(value: str) -> bool:
    msg = Message()
    msg["content-type"] = value
    subtype = msg.get_content_subtype()
    return msg.get_content_maintype() == "application" and (
        subtype == "json" or subtype.endswith("+json")
    )


@pytest.mark.parametrize("value", [pytest.param(h, id=h) for h in HEADERS])
def test_declares_json_agrees_with_the_email_parser(value: str) -> None:
    # reference: Python's email.message.Message.get_content_type (RFC 2045 / RFC 9110
    # section 8.3.1 media types: type "/" subtype, case-insensitive, then parameters)
    assert declares_json(value) is _email_says_json(value)
