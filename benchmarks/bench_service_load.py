"""Load on the local service: 20 concurrent clients posting the demo plan and reading deployments.

Bounded and loopback only. A real waitress server (fieldkit.service, its production thread count) runs
in a subprocess on 127.0.0.1 with a temporary data directory; client threads use keep-alive
connections. Each client does a fixed number of rounds of:

    POST /api/deployments (the demo plan input, new name)   GET /api/deployments/<id>
    PUT  /api/deployments/<id>/checks/<item> (an ack)       PUT the same ack again (a replay)
    GET  /api/deployments/<id>/checks                       GET /api/deployments (the whole list)

Before the clock starts one POST /api/plan computes the demo plan (printed as the cold plan time); the
rounds then post the same plan input, which the service's plan cache answers. Prints throughput,
p50/p95 latency per request kind and overall, errors (the bar is zero), and the server's resident
memory after each pass. Exit status 1 when any request failed.

    .venv/bin/python benchmarks/bench_service_load.py [--clients 20] [--rounds 5] [--passes 2]
"""

from __future__ import annotations

import argparse
import http.client
import json
import os
import re
import statistics
import subprocess
import sys
import tempfile
import threading
import time
import uuid
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
SERVER = """
import logging, sys
logging.getLogger("waitress.queue").setLevel(logging.ERROR)  # queue depth notes are expected here
from waitress.server import create_server
from fieldkit.service import create_app
from fieldkit.service.server import THREADS
app = create_app({"DATA_DIR": sys.argv[1], "DEMO": False})
server = create_server(app, host="127.0.0.1", port=0, threads=THREADS, ident="fieldkit")
print(server.effective_port, flush=True)
server.run()
"""


def percentile(values: list[float], q: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, max(0, round(q * (len(ordered) - 1))))]


class Client:
    def __init__(self, port: int) -> None:
        self.port = port
        self.conn = http.client.HTTPConnection("127.0.0.1", port, timeout=300)

    def reconnect(self) -> None:
        self.conn.close()
        self.conn = http.client.HTTPConnection("127.0.0.1", self.port, timeout=300)

    def call(self, method: str, path: str, body=None) -> tuple[int, object]:
        headers = {"Content-Type": "application/json"} if body is not None else {}
        data = None if body is None else json.dumps(body)
        self.conn.request(method, path, body=data, headers=headers)
        response = self.conn.getresponse()
        raw = response.read()
        return response.status, json.loads(raw) if raw else None


def rss_kib(pid: int) -> int:
    text = Path(f"/proc/{pid}/status").read_text()
    return int(re.search(r"VmRSS:\s+(\d+)", text).group(1))


def run_pass(port: int, plan_input: dict, clients: int, rounds: int) -> dict:
    timings: dict[str, list[float]] = {}
    errors: list[str] = []
    lock = threading.Lock()
    start_gate = threading.Barrier(clients)

    def timed(client: Client, kind: str, method: str, path: str, body=None, ok=(200, 201)):
        """The answer, or None after counting an error (a failed request or an unexpected status)."""
        t0 = time.perf_counter()
        try:
            status, answer = client.call(method, path, body)
        except Exception as exc:  # a benchmark counts failures, whatever they are
            with lock:
                errors.append(f"{kind}: {type(exc).__name__}: {exc}")
            client.reconnect()
            return None
        elapsed = time.perf_counter() - t0
        with lock:
            timings.setdefault(kind, []).append(elapsed)
            if status not in ok:
                errors.append(f"{kind}: HTTP {status} {str(answer)[:200]}")
                return None
        return answer

    def worker(n: int) -> None:
        client = Client(port)
        start_gate.wait()
        for r in range(rounds):
            made = timed(
                client,
                "POST deployment",
                "POST",
                "/api/deployments",
                {**plan_input, "name": f"load {n}-{r}"},
            )
            if not made:
                continue
            dep = f"/api/deployments/{made['id']}"
            timed(client, "GET deployment", "GET", dep)
            checks = timed(client, "GET checks", "GET", dep + "/checks")
            items = (checks or {}).get("items") or [{"id": "none"}]
            tick = {
                "done": True,
                "by": "LT",
                "at": "2026-12-01T15:00:00Z",
                "client_id": str(uuid.uuid4()),
            }
            path = f"{dep}/checks/{items[0]['id']}"
            timed(client, "PUT check", "PUT", path, tick)
            timed(client, "PUT check (replay)", "PUT", path, tick)
            timed(client, "GET list", "GET", "/api/deployments")
        client.conn.close()

    threads = [threading.Thread(target=worker, args=(n,)) for n in range(clients)]
    t0 = time.perf_counter()
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    wall = time.perf_counter() - t0
    return {"timings": timings, "errors": errors, "wall_s": wall}


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--clients", type=int, default=20)
    parser.add_argument("--rounds", type=int, default=5, help="rounds per client and pass")
    parser.add_argument("--passes", type=int, default=2, help="passes (memory is read after each)")
    args = parser.parse_args()
    if not (1 <= args.clients <= 64 and 1 <= args.rounds <= 50 and 1 <= args.passes <= 5):
        parser.error("bounded benchmark: clients 1-64, rounds 1-50, passes 1-5")

    demo = json.loads((ROOT / "assets" / "demo" / "larch-basin-plan.json").read_text())
    plan_input = {k: v for k, v in demo.items() if k != "name"}
    with tempfile.TemporaryDirectory(prefix="fieldkit-bench-") as data_dir:
        server = subprocess.Popen(
            [sys.executable, "-c", SERVER, data_dir],
            stdout=subprocess.PIPE,
            text=True,
            cwd=ROOT,
            env={**os.environ, "PYTHONUNBUFFERED": "1"},
        )
        try:
            port = int(server.stdout.readline())
            t0 = time.perf_counter()
            status, answer = Client(port).call("POST", "/api/plan", plan_input)
            cold = time.perf_counter() - t0
            print(f"cold demo plan (POST /api/plan, computed once): {cold:.1f} s, HTTP {status}")
            if status != 200:
                print(f"the demo plan fails ({str(answer)[:300]}); no load run without a plan")
                return 1
            print(f"server RSS after warm-up: {rss_kib(server.pid) / 1024:.1f} MiB")
            total_errors = 0
            for p in range(1, args.passes + 1):
                out = run_pass(port, plan_input, args.clients, args.rounds)
                every = [t for ts in out["timings"].values() for t in ts]
                n = len(every)
                print(
                    f"\npass {p}: {args.clients} clients x {args.rounds} rounds = {n} requests "
                    f"in {out['wall_s']:.2f} s -> {n / out['wall_s']:.1f} requests/s"
                )
                print(f"  {'kind':22s} {'n':>5s} {'p50 ms':>8s} {'p95 ms':>8s} {'max ms':>8s}")
                for kind, ts in out["timings"].items():
                    print(
                        f"  {kind:22s} {len(ts):5d} {statistics.median(ts) * 1e3:8.1f} "
                        f"{percentile(ts, 0.95) * 1e3:8.1f} {max(ts) * 1e3:8.1f}"
                    )
                print(
                    f"  {'all':22s} {n:5d} {statistics.median(every) * 1e3:8.1f} "
                    f"{percentile(every, 0.95) * 1e3:8.1f} {max(every) * 1e3:8.1f}"
                )
                print(f"  errors: {len(out['errors'])}")
                for line in out["errors"][:10]:
                    print(f"    {line}")
                print(f"  server RSS: {rss_kib(server.pid) / 1024:.1f} MiB")
                total_errors += len(out["errors"])
        finally:
            server.terminate()
            server.wait(timeout=30)
    print(f"\ntotal errors: {total_errors} (bar: 0)")
    return 1 if total_errors else 0


if __name__ == "__main__":
    sys.exit(main())
