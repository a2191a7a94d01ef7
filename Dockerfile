# gearwork: slim image, non-root, dependencies in their own cached layer.
FROM python:3.11-slim AS base
ENV PYTHONDONTWRITEBYTECODE=1 PYTHONUNBUFFERED=1 PIP_NO_CACHE_DIR=1 \
    PIP_DISABLE_PIP_VERSION_CHECK=1 \
    GEARWORK_HOST=0.0.0.0 GEARWORK_PORT=8000 GEARWORK_WORKERS=2
WORKDIR /app

# dependency layer: changes only when the pins change
COPY constraints.txt ./
RUN grep -v -i -E '^(pytest|httpx|schemathesis|hypothesis|hypothesis-graphql|ruff|mypy|mypy_extensions|fluids|psychrolib|coolprop|pint|flexcache|flexparser)==' constraints.txt > runtime-constraints.txt \
 && pip install -c runtime-constraints.txt \
      fastapi 'uvicorn[standard]' pydantic pydantic-settings numpy scipy orjson python-multipart

COPY core ./core
COPY service ./service

RUN useradd --system --uid 10001 --no-create-home gearwork
USER 10001
EXPOSE 8000
HEALTHCHECK --interval=15s --timeout=3s --start-period=10s --retries=3 \
  CMD python -c "import os,urllib.request; urllib.request.urlopen('http://127.0.0.1:%s/healthz' % os.environ.get('GEARWORK_PORT','8000'), timeout=2)"
CMD ["python", "-m", "service"]
