# quadcert service image: slim Python, non-root, health-checked, exec-form start.
# Stage 1 builds the wheel, whose compiled engine needs a C compiler; the runtime image carries none.
FROM python:3.11-slim AS build
RUN apt-get update && apt-get install -y --no-install-recommends gcc libc6-dev && rm -rf /var/lib/apt/lists/*
WORKDIR /src
COPY pyproject.toml README.md ./
COPY service ./service
RUN python -m pip wheel --no-deps --wheel-dir /wheels .

FROM python:3.11-slim
ENV PYTHONDONTWRITEBYTECODE=1 PYTHONUNBUFFERED=1 PIP_NO_CACHE_DIR=1 \
    QUADCERT_HOST=0.0.0.0 QUADCERT_PORT=8000

COPY --from=build /wheels /wheels
RUN python -m pip install --no-compile "$(ls /wheels/*.whl)[server]" && rm -rf /wheels \
    && useradd --create-home --uid 10001 quadcert

USER quadcert
EXPOSE 8000
HEALTHCHECK --interval=15s --timeout=3s --start-period=20s --retries=3 \
    CMD ["python", "-c", "import urllib.request,sys; sys.exit(0 if urllib.request.urlopen('http://127.0.0.1:8000/healthz', timeout=2).status == 200 else 1)"]
STOPSIGNAL SIGTERM
CMD ["quadcert", "serve"]
