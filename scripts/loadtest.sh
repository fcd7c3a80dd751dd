#!/usr/bin/env bash
# Load test of "bowline serve" on this machine (loopback only).
#
# Builds bowline and bowline-load, writes the demo spec (invented Pellwick
# Bike Share corpus), starts "bowline serve" on a free loopback port, then:
#   1. 64 clients for 30 s with 100 documents per request, sampling the
#      server's RSS every second; the targets are zero errors and RSS at the
#      end within 10% of RSS after the first 5 s (--check fails otherwise);
#   2. the table at 1, 8 and 64 clients with 100 documents per request,
#      next to in-process encoding of the same requests with the library,
#      the two alternating in 1 s stretches so both see the same machine
#      load; the target is HTTP/lib >= 0.5. The "per CPU s" column gives
#      the same ratio per CPU second (server and client against the
#      library), which other processes on the machine do not skew.
# Finally it stops the server with SIGTERM (graceful shutdown).
#
# Environment: DURATION (step 1, default 30s), LEVEL (HTTP time of each
# level of step 2, default 10s), CLIENTS (step 1, default 64), DOCS
# (documents per request, default 100), CLIENT (raw or std, the load
# generator's HTTP client, default raw).
set -euo pipefail
cd "$(dirname "$0")/.."

DURATION=${DURATION:-30s}
LEVEL=${LEVEL:-10s}
CLIENTS=${CLIENTS:-64}
DOCS=${DOCS:-100}
CLIENT=${CLIENT:-raw}

work=$(mktemp -d)
pid=""
cleanup() {
	if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
		kill -TERM "$pid" 2>/dev/null || true
		wait "$pid" 2>/dev/null || true
	fi
	rm -rf "$work"
}
trap cleanup EXIT

go build -o "$work/bowline" ./cmd/bowline
go build -o "$work/bowline-load" ./cmd/bowline-load
"$work/bowline" demo --dir "$work/demo" --progress never >/dev/null 2>"$work/demo.log" ||
	{ cat "$work/demo.log" >&2; exit 1; }

# Port 0: the kernel picks a free port, which serve logs as "addr".
"$work/bowline" serve --spec "$work/demo/spec.json" --addr 127.0.0.1:0 2>"$work/serve.log" &
pid=$!
addr=""
for _ in $(seq 1 100); do
	addr=$(sed -n 's/.*"msg":"listening","addr":"\([^"]*\)".*/\1/p' "$work/serve.log" | head -n 1)
	[ -n "$addr" ] && break
	sleep 0.1
done
if [ -z "$addr" ]; then
	echo "loadtest: bowline serve did not start:" >&2
	cat "$work/serve.log" >&2
	exit 1
fi
echo "bowline serve pid $pid on $addr ($(nproc) CPUs)"

status=0
echo
echo "== $CLIENTS clients, $DURATION, $DOCS documents per request"
"$work/bowline-load" --url "http://$addr" --pid "$pid" --clients "$CLIENTS" --duration "$DURATION" \
	--docs-per-request "$DOCS" --client "$CLIENT" --check || status=$?

echo
echo "== 1, 8 and 64 clients, $LEVEL of HTTP each, $DOCS documents per request, against in-process encoding"
"$work/bowline-load" --url "http://$addr" --pid "$pid" --clients 1,8,64 --duration "$LEVEL" \
	--docs-per-request "$DOCS" --client "$CLIENT" --spec "$work/demo/spec.json" || status=$?

kill -TERM "$pid"
wait "$pid" || status=$?
pid=""
echo
echo "server log (refused requests and shutdown):"
grep -v '"msg":"listening"' "$work/serve.log" | tail -n 5
exit "$status"
