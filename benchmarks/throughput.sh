#!/usr/bin/env bash
# Service throughput on loopback with wrk (Debian package "wrk"): simple integrands, uncached and cached.
#   bash benchmarks/throughput.sh [duration-seconds] [connections]
# Starts its own server on a free loopback port and stops it afterwards.
set -euo pipefail
cd "$(dirname "$0")/.."
duration="${1:-15}"
connections="${2:-32}"
port=$(python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')
QUADCERT_LOG_LEVEL=WARNING QUADCERT_QUEUE_LIMIT=256 python3 -m quadcert.cli serve --port "$port" &
server=$!
trap 'kill -TERM $server; wait $server' EXIT
for _ in $(seq 100); do curl -sf "http://127.0.0.1:$port/readyz" >/dev/null && break; sleep 0.2; done
for script in uncached cached; do
  echo "== $script =="
  wrk -t2 -c"$connections" -d"${duration}s" --latency -s "benchmarks/wrk/$script.lua" "http://127.0.0.1:$port/v1/integrals" \
    | grep -E "Requests/sec|Latency|50%|99%|Non-2xx|requests in"
done
