"""``python -m service``: run uvicorn (host, port, workers by flag or GEARWORK_* env), with
the header limits of service.http.protocol and a graceful shutdown bounded by
``GEARWORK_SHUTDOWN_TIMEOUT_S``."""

from __future__ import annotations

import argparse

import uvicorn

from service.http.protocol import LimitedHttpProtocol
from service.settings import get_settings


def main(argv: list[str] | None = None) -> None:
    """Parse flags (defaults from the environment) and serve ``service.app:app``."""
    settings = get_settings()
    parser = argparse.ArgumentParser(prog="python -m service", description=__doc__)
    parser.add_argument("--host", default=settings.host, help="bind address")
    parser.add_argument("--port", type=int, default=settings.port, help="TCP port")
    parser.add_argument("--workers", type=int, default=settings.workers, help="processes")
    parser.add_argument("--log-level", default=settings.log_level, help="uvicorn log level")
    args = parser.parse_args(argv)
    uvicorn.run(
        "service.app:app",
        host=args.host,
        port=args.port,
        workers=args.workers,
        log_level=args.log_level,
        access_log=False,
        # header size, count and time limits (431, 408) on uvicorn's httptools protocol
        http=LimitedHttpProtocol,
        # on SIGTERM: stop accepting, answer what was accepted, then stop
        timeout_graceful_shutdown=int(settings.shutdown_timeout_s + 0.999),
    )


if __name__ == "__main__":
    main()
