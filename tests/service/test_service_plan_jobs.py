"""Plans as bounded jobs (issue 15, item 1): worker processes, a bounded queue, deadlines, giving up.

Real worker processes run the real planner on the demo site (invented, assets/demo) and on a small
two-tree site; in-process requests go through the Flask test client, the give-up case through a real
waitress socket on loopback. The plans' numbers are checked elsewhere (tests/plan); here the answer
through a job must be exactly the planner's own.
"""

from __future__ import annotations

import json
import socket
import time
import uuid

import pytest

from fieldkit.planning import STAGES
from fieldkit.service import create_app
from fieldkit.service.plan_jobs import KILL_GRACE_S, PlanBoard
from fieldkit.service.server import start_in_thread
from tests.robustness.helpers import SMALL_PLAN, demo_variant, long_variant, stop_server


def poll(client, job_id: str, *, until=("done", "failed", "cancelled"), timeout_s: float = 120.0):
    end = time.monotonic() + timeout_s
    while time.monotonic() < end:
        status = client.get(f"/api/plans/{job_id}").json
        if status["state"] in until:
            return status
        time.sleep(0.05)
    raise AssertionError(f"job {job_id} still {status} after {timeout_s} s")


@pytest.fixture(scope="module")
def tight(tmp_path_factory):
    """A service with one worker, a queue of one and a half-second deadline (the long variant takes
    ~4 times that; the small plan ~0.1 s)."""
    board = PlanBoard(workers=1, queue_limit=1, deadline_s=0.5)
    board.start()
    app = create_app(
        {"DATA_DIR": tmp_path_factory.mktemp("tight"), "DEMO": False, "PLAN_BOARD": board}
    )
    yield app
    board.close()


def test_a_job_answers_exactly_what_the_planner_answers(client):
    from fieldkit.planning import plan

    started = client.post("/api/plans", json=SMALL_PLAN)
    assert started.status_code == 202, started.json
    assert started.headers["Location"] == f"/api/plans/{started.json['id']}"
    status = poll(client, started.json["id"])
    assert status["state"] == "done", status
    answer = client.get(status["result_url"])
    assert answer.status_code == 200
    direct = json.loads(json.dumps(plan(SMALL_PLAN)))
    # the same plan; "engine" holds the solver's own timings, which differ between two runs
    assert {k: v for k, v in answer.json.items() if k != "engine"} == {
        k: v for k, v in direct.items() if k != "engine"
    }
    assert client.post("/api/plan", json=SMALL_PLAN).json == answer.json  # the same, from the cache


def test_the_same_input_shares_one_job(client, demo_input):
    spec = demo_variant(demo_input, 1)
    first = client.post("/api/plans", json=spec).json
    second = client.post("/api/plans", json=spec).json
    assert first["id"] == second["id"]
    assert poll(client, first["id"])["state"] == "done"


def test_progress_is_reported_while_a_plan_runs(client, demo_input):
    job_id = client.post("/api/plans", json=long_variant(demo_input, 2)).json["id"]
    seen = []
    while (status := client.get(f"/api/plans/{job_id}").json)["state"] not in ("done", "failed"):
        seen.append((status["state"], status["stage"], status["done"], status["total"]))
        time.sleep(0.02)
    assert status["state"] == "done"
    assert any(state == "running" for state, *_ in seen), seen
    assert all(0 <= done <= max(total, 1) for *_, done, total in seen), seen


def test_a_full_queue_answers_503_with_retry_after(tight, demo_input):
    client = tight.test_client()
    running = client.post("/api/plans", json=long_variant(demo_input, 10)).json
    poll(client, running["id"], until=("running",))  # taken by the one worker
    queued = client.post("/api/plans", json=demo_variant(demo_input, 11)).json
    refused = client.post("/api/plans", json=demo_variant(demo_input, 12))
    assert refused.status_code == 503, refused.json
    assert refused.json["error"] == "busy" and refused.json["detail"]
    assert int(refused.headers["Retry-After"]) >= 1
    also = client.post("/api/plan", json=demo_variant(demo_input, 13))
    assert also.status_code == 503 and int(also.headers["Retry-After"]) >= 1
    # health and reads are answered meanwhile, and say how busy the plans are
    health = client.get("/api/health").json
    assert health["ok"] is True and health["plans"]["plans_queued"] == 1
    assert client.get("/api/deployments").status_code == 200
    for job in (queued, running):
        assert client.delete(f"/api/plans/{job['id']}").status_code == 200
    assert poll(client, queued["id"])["state"] == "cancelled"
    assert poll(client, running["id"], timeout_s=KILL_GRACE_S + 30)["state"] in (
        "cancelled",
        "failed",
    )


def test_a_plan_past_its_deadline_is_stopped_with_a_clear_error(tight, demo_input):
    client = tight.test_client()
    client.post("/api/plan", json=SMALL_PLAN)  # the worker is up and warm
    worker = tight.extensions["fieldkit_plan_board"]._slots[0].worker.proc
    started = time.monotonic()
    response = client.post("/api/plan", json=long_variant(demo_input, 20))
    took = time.monotonic() - started
    assert response.status_code == 422, response.json
    assert response.json["error"] == "plan too long"
    assert "deadline of 0.5 s" in response.json["detail"]
    # stopped for real, at a report of the planner: named stage, and the same worker, not killed
    assert any(stage in response.json["detail"] for stage in STAGES), response.json["detail"]
    assert took < 0.5 + KILL_GRACE_S + 15, took
    # the next plan is answered (the small one fits in the half second) by the same worker process:
    # the plan stopped itself at its deadline, nothing had to be killed
    again = client.post("/api/plan", json={**SMALL_PLAN, "channels_mhz": [3.8]})
    assert again.status_code == 200, again.json
    slot = tight.extensions["fieldkit_plan_board"]._slots[0]
    assert slot.worker.proc is worker and worker.poll() is None


def test_a_client_that_gives_up_stops_its_plan(tmp_path, demo_input):
    board = PlanBoard(workers=1, queue_limit=2, deadline_s=60.0)
    board.start()
    app = create_app({"DATA_DIR": tmp_path / "data", "DEMO": False, "PLAN_BOARD": board})
    running = start_in_thread(app)
    try:
        alias = str(uuid.uuid4())
        body = json.dumps(long_variant(demo_input, 30)).encode()
        with socket.create_connection(("127.0.0.1", running.port), timeout=10) as sock:
            sock.sendall(
                b"POST /api/plan HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Type: application/json\r\n"
                + f"X-Fieldkit-Job: {alias}\r\nContent-Length: {len(body)}\r\n\r\n".encode()
                + body
            )
            end = time.monotonic() + 30
            while (job := board.find(alias)) is None or job.state == "queued":
                assert time.monotonic() < end
                time.sleep(0.05)
        # the socket is closed: the waiting request notices, nobody else wants the job
        end = time.monotonic() + KILL_GRACE_S + 30
        while not job.over:
            assert time.monotonic() < end, board.status(job)
            time.sleep(0.05)
        assert job.state == "cancelled", board.status(job)
        assert board.load()["plans_running"] == 0
    finally:
        stop_server(running)
        board.close()


def test_a_deployment_write_can_be_followed_by_its_job_id(client):
    alias = str(uuid.uuid4())
    made = client.post(
        "/api/deployments",
        json={**SMALL_PLAN, "name": "followed"},
        headers={"X-Fieldkit-Job": alias},
    )
    assert made.status_code == 201, made.json
    status = client.get(f"/api/plans/{alias}").json
    assert status["state"] == "done"
    assert (
        client.get(f"/api/plans/{alias}/result").json
        == client.get(f"/api/deployments/{made.json['id']}").json["result"]
    )


def test_a_bad_job_header_is_refused_by_name(client):
    response = client.post("/api/plan", json=SMALL_PLAN, headers={"X-Fieldkit-Job": "not-a-uuid"})
    assert response.status_code == 400 and response.json["field"] == "X-Fieldkit-Job"


def test_unknown_jobs_are_404(client):
    for method, path in (
        ("GET", "/api/plans/nope"),
        ("GET", "/api/plans/nope/result"),
        ("DELETE", "/api/plans/nope"),
    ):
        response = client.open(path, method=method)
        assert response.status_code == 404 and response.json["field"] == "job_id"


def test_a_refused_input_fails_the_job_with_the_planners_error(client):
    job_id = client.post("/api/plans", json={**SMALL_PLAN, "form": "spiral"}).json["id"]
    status = poll(client, job_id)
    assert status["state"] == "failed" and status["error"]["field"] == "form"
    result = client.get(f"/api/plans/{job_id}/result")
    assert result.status_code == 422 and result.json["field"] == "form"
