"""Soak the real service: 20 concurrent clients mixing plans, checklist writes and reads, in rounds.

Bounded and loopback only: ``fieldkit.service.serve`` runs in a subprocess on 127.0.0.1 (a free port)
with a temporary FIELDKIT_HOME; a fixed number of requests per round, a fixed number of rounds, then
it stops by itself. Each round shuffles (seeded) a fixed mix over the clients' keep-alive
connections:

    POST /api/plan                                   a small plan, a new variant each time (no cache);
                                                     a 503 (plan queue full) waits Retry-After, retries
    PUT  /api/deployments/<id>/checks/<item>         an acknowledgement with a fresh client_id
    GET  /api/deployments | /<id> | /<id>/checks     reads

Prints per kind and overall p50/p95/max latency, throughput and errors (the bar is zero), and the
server's resident memory (VmRSS from /proc) after every round; the memory is "stable" when it grows
by less than ``--rss-slack-mb`` from the end of the second round to the end of the last. At the end
every acknowledgement answered 200 is counted in the database and ``PRAGMA integrity_check`` run.
Exit status 1 on any error, lost acknowledgement or memory growth.

    .venv/bin/python benchmarks/bench_soak.py [--clients 20] [--rounds 4] [--requests 400]
"""

from __future__ import annotations

import argparse
import copy
import http.client
import json
import random
import re
import sqlite3
import statistics
import subprocess
import sys
import tempfile
import threading
import time
import uuid
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from tests.robustness.helpers import SMALL_PLAN, checklist_export, seed_data_dir  # noqa: E402

ITEMS = [
    item["id"]
    for item in checklist_export()["deployment"]["result"]["options"][0]["safety"]["checklist"]
]


def _rss_mb(pid: int) -> float:
    text = Path(f"/proc/{pid}/status").read_text()
    return int(re.search(r"VmRSS:\s+(\d+) kB", text).group(1)) / 1024


def _start(data_dir: Path) -> tuple[subprocess.Popen, int]:
    code = (
        "import logging; logging.getLogger('waitress.queue').setLevel(logging.ERROR)\n"
        "from fieldkit.service import serve\n"
        f"serve(host='127.0.0.1', port=0, data_dir={str(data_dir)!r})\n"
    )
    proc = subprocess.Popen(
        [sys.executable, "-c", code],
        cwd=ROOT,
        env={"FIELDKIT_HOME": str(data_dir), "PYTHONUNBUFFERED": "1", "PATH": "/usr/bin:/bin"},
        stdout=subprocess.PIPE,
        stderr=open(data_dir / "server.log", "ab"),  # noqa: SIM115 - lives as long as the server
    )
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        line = proc.stdout.readline()
        match = re.search(rb"http://127\.0\.0\.1:(\d+)/", line)
        if match:
            return proc, int(match.group(1))
        if not line and proc.poll() is not None:
            break
    proc.kill()
    raise SystemExit(f"server did not start: {(data_dir / 'server.log').read_text()[-2000:]}")


def _plan_variant(n: int) -> dict:
    spec = copy.deepcopy(SMALL_PLAN)
    spec["kit"]["tension_n"] = (
        40.0 + 0.25 * n
    )  # a new input each time: the plan cache cannot answer
    return spec


def _tasks(rng: random.Random, n: int, plans: int, deployment_id: str, round_no: int) -> list:
    writes = (n - plans) // 2
    reads = n - plans - writes
    tasks = [
        ("plan", "POST", "/api/plan", _plan_variant(round_no * 1000 + i)) for i in range(plans)
    ]
    for i in range(writes):
        body = {
            "done": i % 4 != 3,
            "by": f"C{i % 9}",
            "at": f"2026-12-01T{10 + round_no:02d}:{i // 60 % 60:02d}:{i % 60:02d}Z",
            "client_id": str(uuid.uuid4()),
        }
        item = ITEMS[i % len(ITEMS)]
        tasks.append(("ack", "PUT", f"/api/deployments/{deployment_id}/checks/{item}", body))
    paths = [
        "/api/deployments",
        f"/api/deployments/{deployment_id}",
        f"/api/deployments/{deployment_id}/checks",
    ]
    tasks += [("read", "GET", paths[i % len(paths)], None) for i in range(reads)]
    rng.shuffle(tasks)
    return tasks


def _client(
    port: int, tasks: list, lock: threading.Lock, out: list, acked: list, busy: list
) -> None:
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=120)
    while True:
        with lock:
            if not tasks:
                break
            kind, method, path, body = tasks.pop()
        data = None if body is None else json.dumps(body)
        headers = {"Content-Type": "application/json"} if data else {}
        start = time.perf_counter()
        try:
            conn.request(method, path, body=data, headers=headers)
            response = conn.getresponse()
            payload = response.read()
            if response.status == 503 and kind == "plan":  # the plan queue is full: as documented,
                wait = min(5.0, float(response.getheader("Retry-After") or 1))  # wait and retry
                with lock:
                    busy.append(wait)
                    tasks.append((kind, method, path, body))
                time.sleep(wait)
                continue
            ok = 200 <= response.status < 300
            if ok:
                json.loads(payload)
            error = None if ok else f"{response.status} {payload[:120]!r}"
        except (OSError, http.client.HTTPException, ValueError) as exc:
            error = f"{type(exc).__name__}: {exc}"
            conn.close()
            conn = http.client.HTTPConnection("127.0.0.1", port, timeout=120)
        elapsed = time.perf_counter() - start
        with lock:
            out.append((kind, elapsed, error))
            if kind == "ack" and error is None:
                acked.append(body["client_id"])
    conn.close()


def _pct(values: list[float], q: float) -> float:
    ordered = sorted(values)
    return ordered[min(len(ordered) - 1, int(round(q * (len(ordered) - 1))))]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--clients", type=int, default=20)
    parser.add_argument("--rounds", type=int, default=4)
    parser.add_argument("--requests", type=int, default=400, help="requests per round")
    parser.add_argument("--plans", type=int, default=6, help="plans per round (each ~1-3 s of CPU)")
    parser.add_argument("--seed", type=int, default=20261202)
    parser.add_argument("--rss-slack-mb", type=float, default=25.0)
    args = parser.parse_args()
    rng = random.Random(args.seed)

    with tempfile.TemporaryDirectory(prefix="fieldkit-soak-") as tmp:
        data_dir = Path(tmp)
        deployment_id = seed_data_dir(data_dir)  # one checklist deployment; no demo plan at start
        proc, port = _start(data_dir)
        print(
            f"fieldkit soak: {args.clients} clients, {args.rounds} rounds x {args.requests} requests "
            f"({args.plans} plans each), server pid {proc.pid} on 127.0.0.1:{port}"
        )
        print(f"  server RSS at start: {_rss_mb(proc.pid):.1f} MB")
        all_results: list = []
        acked: list[str] = []
        busy: list[float] = []
        rss: list[float] = []
        try:
            for round_no in range(args.rounds):
                tasks = _tasks(rng, args.requests, args.plans, deployment_id, round_no)
                results: list = []
                lock = threading.Lock()
                threads = [
                    threading.Thread(target=_client, args=(port, tasks, lock, results, acked, busy))
                    for _ in range(args.clients)
                ]
                t0 = time.perf_counter()
                for t in threads:
                    t.start()
                for t in threads:
                    t.join()
                wall = time.perf_counter() - t0
                rss.append(_rss_mb(proc.pid))
                lat = [r[1] for r in results]
                errors = [r[2] for r in results if r[2]]
                print(
                    f"  round {round_no + 1}: {len(results)} requests in {wall:.1f} s "
                    f"({len(results) / wall:.1f}/s), p50 {1000 * statistics.median(lat):.0f} ms, "
                    f"p95 {1000 * _pct(lat, 0.95):.0f} ms, errors {len(errors)}, RSS {rss[-1]:.1f} MB"
                )
                for e in errors[:5]:
                    print(f"    error: {e}")
                all_results += results
        finally:
            proc.terminate()
            proc.wait(30)
            proc.stdout.close()
        with sqlite3.connect(data_dir / "fieldkit.sqlite3") as db:
            stored = {row[0] for row in db.execute("SELECT client_id FROM acknowledgements")}
            integrity = db.execute("PRAGMA integrity_check").fetchone()[0]

    print(f"  {'kind':<6} {'count':>6} {'p50 ms':>8} {'p95 ms':>8} {'max ms':>8}")
    for kind in ("plan", "ack", "read", "all"):
        lat = [r[1] for r in all_results if kind in ("all", r[0])]
        if lat:
            print(
                f"  {kind:<6} {len(lat):>6} {1000 * statistics.median(lat):>8.0f} "
                f"{1000 * _pct(lat, 0.95):>8.0f} {1000 * max(lat):>8.0f}"
            )
    errors = sum(1 for r in all_results if r[2])
    lost = len(set(acked) - stored)
    growth = rss[-1] - rss[1] if len(rss) > 1 else 0.0
    stable = growth < args.rss_slack_mb
    print(
        f"  errors: {errors}; acknowledgements answered 200: {len(acked)}, lost: {lost}; "
        f"integrity_check: {integrity}; plan requests told 503 (queue full) and retried: {len(busy)}"
    )
    print(
        f"  RSS by round (MB): {', '.join(f'{v:.1f}' for v in rss)}; growth after round 2: "
        f"{growth:+.1f} MB ({'stable' if stable else 'GROWING'}, slack {args.rss_slack_mb:g} MB)"
    )
    return 0 if errors == 0 and lost == 0 and integrity == "ok" and stable else 1


if __name__ == "__main__":
    sys.exit(main())
