"""Write openapi/openapi.json from the app (``python -m scripts.write_openapi``)."""

from __future__ import annotations

import json
from pathlib import Path

from service.app import app

TARGET = Path(__file__).resolve().parent.parent / "openapi" / "openapi.json"


def render() -> str:
    """The OpenAPI document as committed: sorted keys, two-space indent, final newline."""
    return json.dumps(app.openapi(), indent=2, sort_keys=True, ensure_ascii=False) + "\n"


def main() -> None:
    """Write the document and say where."""
    TARGET.write_text(render(), encoding="utf-8")
    print(f"wrote {TARGET}")


if __name__ == "__main__":
    main()
