"""The plan's progress report and stop (the interface agreed with the service, TEAM.md):
``plan(spec, report=...)`` reports its stages in order with done ≤ total, at least once per engine
solve and safety check; an exception raised by the report stops the plan at once and comes out
unchanged; without a report the plan is the same."""

import copy

import pytest

import fieldkit.antenna
from fieldkit.errors import InputError
from fieldkit.planning import STAGES, plan
from tests.rigging.cases import spec, two_trees

TIMINGS = ("sky_s", "screen_s", "finish_s", "safety_s", "total_seconds")


def _small():
    s = spec(supports=two_trees(40, 10.0), channel_mhz=7.1, ground="perfect")
    s["site"]["supports"].append({"id": "C", "kind": "tree", "height_m": 9.0, "x_m": 0, "y_m": 30})
    s["channels_mhz"] = [7.1, 7.2]
    return s


def _without_timings(result):
    out = copy.deepcopy(result)
    for key in TIMINGS:
        out["engine"].pop(key)
    return out


class Recorder:
    def __init__(self):
        self.calls = []

    def __call__(self, stage, done, total):
        self.calls.append((stage, done, total))


@pytest.fixture(scope="module")
def reported():
    rec = Recorder()
    return plan(_small(), report=rec), rec.calls


def test_stages_arrive_in_order_with_done_within_total(reported):
    _result, calls = reported
    order = [STAGES.index(stage) for stage, _, _ in calls]
    assert order == sorted(order)
    assert {stage for stage, _, _ in calls} == set(STAGES)
    assert all(0 <= done <= total for _, done, total in calls)
    assert calls[-1] == ("result", 1, 1)
    for stage in STAGES:  # each stage ends complete
        last = [c for c in calls if c[0] == stage][-1]
        assert last[1] == last[2], last


def test_reported_at_least_once_per_engine_solve_and_safety_check(reported):
    result, calls = reported
    engine_stages = [c for c in calls if c[0] in ("height sweeps", "resonance")]
    assert len(engine_stages) >= result["engine"]["solve_calls"]
    safety = [c for c in calls if c[0] == "safety"]
    assert len(safety) >= len(result["options"]) + 1  # one per check and the step's end


def test_no_report_gives_the_same_plan(reported):
    result, _calls = reported
    assert _without_timings(plan(_small())) == _without_timings(result)


class Stop(Exception):
    pass


class Deadline(InputError):
    """Like a service's own error built on InputError: must not be taken for a bad hang."""


def _counting_solves(monkeypatch):
    count = [0]
    real = fieldkit.antenna.solve

    def counted(*args, **kwargs):
        count[0] += 1
        return real(*args, **kwargs)

    monkeypatch.setattr(fieldkit.antenna, "solve", counted)
    return count


@pytest.mark.parametrize("error", [Stop("stop"), Deadline("(service)", "time is up", status=503)])
def test_an_exception_from_the_report_stops_the_plan_unchanged(monkeypatch, error):
    solves = _counting_solves(monkeypatch)
    full = plan(_small())["engine"]["solve_calls"]
    solves[0] = 0
    seen = []

    def report(stage, done, total):
        seen.append(stage)
        if stage == "height sweeps" and seen.count(stage) == 2:  # inside the first sweep's solves
            raise error

    with pytest.raises(type(error)) as got:
        plan(_small(), report=report)
    assert got.value is error
    assert solves[0] < full  # stopped before the plan's work was done ...
    assert seen[-1] == "height sweeps"  # ... and nothing was reported after the stop


def test_a_stop_at_the_first_report_solves_nothing(monkeypatch):
    solves = _counting_solves(monkeypatch)

    def report(stage, done, total):
        raise Stop(stage)

    with pytest.raises(Stop):
        plan(_small(), report=report)
    assert solves[0] == 0
