"""JSON responses serialised by orjson, NumPy arrays included."""

from __future__ import annotations

from typing import Any

import orjson
from starlette.responses import JSONResponse

__all__ = ["FastJSONResponse"]

_OPTIONS = orjson.OPT_SERIALIZE_NUMPY | orjson.OPT_NON_STR_KEYS


class FastJSONResponse(JSONResponse):
    """``application/json`` via orjson; NumPy float arrays serialise without copying."""

    def render(self, content: Any) -> bytes:
        return orjson.dumps(content, option=_OPTIONS)
