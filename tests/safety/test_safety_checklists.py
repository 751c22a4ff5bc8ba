"""Checklist templates, stable ids, ready-to-raise and the export formats; weather rules."""

import csv
import io

import pytest

from fieldkit.errors import InputError
from fieldkit.safety import checklist_csv, checklist_json, checklist_templates, ready_to_raise
from fieldkit.safety.checklists import STAGES, item_id
from fieldkit.safety.weather import (
    lightning_advice,
    lightning_distance_m,
    mast_wind_limits,
    mast_wind_ok,
)

ITEMS = [
    {"id": "pre-power-line-0", "stage": "pre-raise", "text": "line", "required": True},
    {"id": "pre-lightning", "stage": "pre-raise", "text": "storm", "required": True},
    {"id": "pre-keep-out-none", "stage": "pre-raise", "text": "none", "required": False},
    {"id": "after-swr-check", "stage": "after-raise", "text": "swr", "required": True},
]


def _ack(item, done=True, at="2026-12-01T14:05:00Z", by="AB", cid="c1"):
    return {"item_id": item, "done": done, "by": by, "at": at, "client_id": cid}


def test_templates_cover_every_stage_with_unique_ids():
    items = checklist_templates()
    assert {it["stage"] for it in items} == set(STAGES)
    ids = [it["id"] for it in items]
    assert len(ids) == len(set(ids))
    assert all(set(it) >= {"id", "stage", "text", "required"} for it in items)
    # NWS lightning guidance is among the pre-raise items
    assert any("thunder" in it["text"] and it["stage"] == "pre-raise" for it in items)


def test_ids_are_stable_and_deterministic():
    assert item_id("pre-raise", "power-line", 0) == "pre-power-line-0"
    assert item_id("pre-raise", "unsafe-support", "T3") == "pre-unsafe-support-t3"
    assert item_id("tear-down", "count kit") == "down-count-kit"
    assert checklist_templates() == checklist_templates()


def test_ready_only_when_every_required_pre_raise_item_is_done():
    assert not ready_to_raise(ITEMS, [])
    assert not ready_to_raise(ITEMS, [_ack("pre-power-line-0")])
    acks = [_ack("pre-power-line-0"), _ack("pre-lightning", cid="c2")]
    # the optional pre-raise item and the after-raise item do not block raising
    assert ready_to_raise(ITEMS, acks)


def test_latest_acknowledgement_decides():
    acks = [
        _ack("pre-power-line-0"),
        _ack("pre-lightning", at="2026-12-01T14:06:00Z", cid="c2"),
        # withdrawn later ...
        _ack("pre-lightning", done=False, at="2026-12-01T14:10:00+00:00", cid="c3"),
    ]
    assert not ready_to_raise(ITEMS, acks)
    # ... a late-arriving but earlier-stamped tick does not override the withdrawal (offline phone)
    acks.append(_ack("pre-lightning", at="2026-12-01T15:08:00+01:00", cid="c4"))  # 14:08 UTC
    assert not ready_to_raise(ITEMS, acks)
    acks.append(_ack("pre-lightning", at="2026-12-01T14:20:00Z", cid="c5"))
    assert ready_to_raise(ITEMS, acks)
    # mapping form: item id → acknowledgement(s)
    assert ready_to_raise(ITEMS, {"pre-power-line-0": _ack("x"), "pre-lightning": [_ack("y")]})


def test_missing_required_flag_counts_as_required():
    items = [{"id": "pre-x", "stage": "pre-raise", "text": "x"}]
    assert not ready_to_raise(items, [])


def test_csv_export_round_trips_and_defuses_formulas():
    acks = [_ack("pre-power-line-0", by='=HYPERLINK("x")')]
    text = checklist_csv(ITEMS, acks)
    rows = list(csv.DictReader(io.StringIO(text)))
    assert [r["id"] for r in rows] == [it["id"] for it in ITEMS]
    assert rows[0]["done"] == "true" and rows[1]["done"] == "false"
    assert rows[0]["by"].startswith("'=")  # CSV injection guarded (OWASP CSV injection guidance)
    assert rows[0]["at_utc"] == "2026-12-01T14:05:00Z"


def test_json_export_keeps_every_acknowledgement():
    acks = [
        _ack("pre-lightning"),
        _ack("pre-lightning", done=False, at="2026-12-01T14:09:00Z", cid="c2"),
    ]
    out = checklist_json(ITEMS, acks, cautions=["planning aid"])
    assert len(out["acknowledgements"]) == 2
    assert out["ready_to_raise"] is False
    assert out["items"][1]["done"] is False and out["cautions"] == ["planning aid"]


def test_lightning_rules():
    # speed of sound 343 m/s: a 30 s flash-to-bang is 10.29 km (computed)
    assert lightning_distance_m(flash_to_bang_s=30) == pytest.approx(10290.0)
    # NWS 30-30 rule: ≤ 30 s → shelter now
    assert "shelter now" in lightning_advice(flash_to_bang_s=30, minutes_since_thunder=None)
    assert "shelter now" not in lightning_advice(flash_to_bang_s=45, minutes_since_thunder=None)
    # NWS: wait 30 minutes after the last thunder
    assert "another 20 min" in lightning_advice(flash_to_bang_s=None, minutes_since_thunder=10)
    assert "may go on" in lightning_advice(flash_to_bang_s=None, minutes_since_thunder=31)
    with pytest.raises(InputError):
        lightning_distance_m(flash_to_bang_s=-1)


def test_mast_wind_limits():
    limits = mast_wind_limits([{"id": "M1", "height_m": 9}, {"id": "M2", "wind_limit_m_s": 8.0}])
    # default: Beaufort 6 starts at 10.8 m/s (WMO Beaufort scale; common practice for masts)
    assert limits[0].limit_m_s == 10.8 and not limits[0].rated
    assert limits[1].limit_m_s == 8.0 and limits[1].rated
    assert mast_wind_ok(gust_m_s=8.0, limit_m_s=8.0) and not mast_wind_ok(
        gust_m_s=8.1, limit_m_s=8.0
    )
