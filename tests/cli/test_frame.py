"""The `fieldkit` command frame: JSON in from a file or stdin, one clear line and exit 2 on bad input.

These run the installed console script as a user would (a real process, no mocks).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from fieldkit import __version__, jsonio, paths
from fieldkit.errors import InputError, check_keys, number

ROOT = Path(__file__).resolve().parents[2]


def run(
    *args: str, stdin: str | None = None, env: dict | None = None
) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "fieldkit", *args],
        input=stdin,
        capture_output=True,
        text=True,
        timeout=120,
        cwd=ROOT,
        env={**os.environ, **(env or {})},
    )


def test_version():
    r = run("--version")
    assert r.returncode == 0
    assert r.stdout.strip() == f"fieldkit {__version__}"


@pytest.mark.parametrize("command", ["model", "sky", "plan"])
def test_malformed_json_names_line_and_column(command):
    r = run(command, "-", stdin='{\n  "frequency_mhz": 3.6,\n  "ground": }\n')
    assert r.returncode == 2
    assert "line 3, column 13" in r.stderr
    assert "Traceback" not in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1


@pytest.mark.parametrize(
    ("stdin", "expected"),
    [
        ("", "empty input"),
        ('{"frequency_mhz": NaN}', "NaN is not valid JSON"),
        ('{"frequency_mhz": Infinity}', "Infinity is not valid JSON"),
        ("[" * 100000 + "]" * 100000, "nested too deeply"),
    ],
)
def test_bad_json_one_clear_line(stdin, expected):
    r = run("model", "-", stdin=stdin)
    assert r.returncode == 2
    assert expected in r.stderr
    assert "Traceback" not in r.stderr


def test_missing_file():
    r = run("plan", "no-such-file.json")
    assert r.returncode == 2
    assert "no such file: no-such-file.json" in r.stderr


def test_unknown_subcommand_is_a_usage_error():
    r = run("fly")
    assert r.returncode == 2
    assert "invalid choice" in r.stderr


def test_not_utf8(tmp_path):
    f = tmp_path / "bad.json"
    f.write_bytes(b'{"name": "\xff"}')
    r = run("plan", str(f))
    assert r.returncode == 2
    assert "not UTF-8" in r.stderr


def test_data_dir_override(tmp_path):
    os.environ["FIELDKIT_HOME"] = str(tmp_path / "home")
    try:
        assert paths.data_dir() == tmp_path / "home"
        assert (tmp_path / "home").is_dir()
    finally:
        del os.environ["FIELDKIT_HOME"]


def test_cache_dir_override_and_default(tmp_path, monkeypatch):
    monkeypatch.setenv("FIELDKIT_CACHE_DIR", str(tmp_path / "cache"))
    assert paths.cache_dir() == tmp_path / "cache"
    assert (tmp_path / "cache").is_dir()
    # without the override: the platform's user cache directory (platformdirs; XDG on Linux)
    import platformdirs

    monkeypatch.delenv("FIELDKIT_CACHE_DIR")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert paths.cache_dir() == Path(platformdirs.user_cache_dir("fieldkit", appauthor=False))


def test_output_refuses_nan():
    with pytest.raises(ValueError):
        jsonio.dumps({"x": float("nan")})


@pytest.mark.parametrize(
    ("value", "kwargs", "message"),
    [
        (True, {}, "expected a number"),
        ("12", {"unit": "m"}, "expected a number in m"),
        (float("inf"), {}, "finite"),
        (-1.0, {"minimum": 0, "unit": "m"}, "at least 0 m"),
        (0.0, {"minimum": 0, "exclusive_minimum": True}, "more than 0"),
        (31.0, {"maximum": 30, "unit": "MHz"}, "at most 30 MHz"),
        (2.5, {"integer": True}, "an integer"),
    ],
)
def test_number_errors_name_the_field(value, kwargs, message):
    with pytest.raises(InputError) as err:
        number(value, "site.supports[0].height_m", **kwargs)
    assert err.value.field == "site.supports[0].height_m"
    assert message in err.value.detail


def test_unknown_field_refused_by_name():
    with pytest.raises(InputError) as err:
        check_keys({"heigth_m": 3}, "site.supports[1]", ["height_m", "id"])
    assert err.value.field == "site.supports[1].heigth_m"
    assert "unknown field" in err.value.detail


def test_empty_key_still_names_a_field():
    with pytest.raises(InputError) as err:
        check_keys({"": 1}, "", ["height_m"])
    assert err.value.field == '""'


def test_demo_files_are_json():
    for f in (ROOT / "assets" / "demo").glob("*.json"):
        json.loads(f.read_text())


def test_output_is_complete_though_the_program_ends_without_teardown():
    # `fieldkit model` ends with os._exit after flushing (issue 17): a long answer on a pipe must
    # arrive whole, equal to the in-process result
    from fieldkit.antenna import model_json

    spec = json.loads((ROOT / "assets" / "demo" / "dipole-model.json").read_text())
    sweep = []
    for h in (6.0, 8.0, 10.0, 12.0, 14.0):
        s = json.loads(json.dumps(spec))
        for w in s["wires"]:
            w["points_m"] = [[x, y, h] for x, y, _ in w["points_m"]]
        sweep.append(s)
    r = run("model", "-", stdin=json.dumps(sweep))
    assert r.returncode == 0, r.stderr
    assert json.loads(r.stdout) == json.loads(json.dumps(model_json(sweep)))
