# gearwork: slim image, non-root, dependencies in their own cached layer.
#
#   docker build -t gearwork:0.1.0 .
#   docker run --rm -p 8000:8000 -e GEARWORK_WORKERS=2 gearwork:0.1.0
#
# Stage 1 builds a virtual environment with the runtime dependencies only: the
# [project] dependencies of pyproject.toml, pinned by constraints.txt (test tools stay out).
FROM python:3.11-slim-bookworm AS deps
ENV PIP_NO_CACHE_DIR=1 PIP_DISABLE_PIP_VERSION_CHECK=1
WORKDIR /build
COPY pyproject.toml constraints.txt ./
RUN python -c "import tomllib; print('\n'.join(tomllib.load(open('pyproject.toml', 'rb'))['project']['dependencies']))" > requirements.txt \
 && python -m venv /opt/venv \
 && /opt/venv/bin/pip install -c constraints.txt -r requirements.txt

# Stage 2: the runtime, no build tools, no pip cache, code byte-compiled at build time so a
# read-only root filesystem costs nothing at start. Containers share the host's CPUs and
# cannot see each other's CPU claims, so workers are not pinned to one CPU each here.
FROM python:3.11-slim-bookworm
ENV PYTHONDONTWRITEBYTECODE=1 PYTHONUNBUFFERED=1 PATH=/opt/venv/bin:$PATH \
    GEARWORK_HOST=0.0.0.0 GEARWORK_PORT=8000 GEARWORK_WORKERS=2 GEARWORK_PIN_CPU=false \
    PROMETHEUS_MULTIPROC_DIR=/tmp/metrics MPLBACKEND=Agg MPLCONFIGDIR=/tmp/matplotlib
RUN groupadd --system --gid 10001 gearwork \
 && useradd --system --uid 10001 --gid 10001 --no-create-home --shell /usr/sbin/nologin gearwork
COPY --from=deps /opt/venv /opt/venv
WORKDIR /app
COPY core ./core
COPY service ./service
RUN python -m compileall -q core service

USER 10001:10001
EXPOSE 8000
STOPSIGNAL SIGTERM
HEALTHCHECK --interval=15s --timeout=3s --start-period=10s --retries=3 \
  CMD python -c "import os, urllib.request; urllib.request.urlopen('http://127.0.0.1:%s/healthz' % os.environ.get('GEARWORK_PORT', '8000'), timeout=2)"
# the metrics files of earlier processes go first (they would be summed with the new ones)
CMD ["sh", "-c", "rm -f \"${PROMETHEUS_MULTIPROC_DIR:-/tmp/metrics}\"/*.db; exec python -m service"]
