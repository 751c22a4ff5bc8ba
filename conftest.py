"""Suite-wide rule: `make test` runs every part. A skipped test there is a failure.

`make test` sets FIELDKIT_NO_SKIPS=1: a test that skips (a missing browser, Xvfb, a layer that does
not import) fails the run with its reason, so nothing is silently left out. The quick loop
(`make unit`, or pytest by hand) keeps skips as skips.
"""

from __future__ import annotations

import os
import shutil
import tempfile

import pytest


def pytest_configure(config: pytest.Config) -> None:
    # derived files (the compact IRI tables, fitted complex images) go to a fresh directory per
    # session, never to the user's cache; subprocesses (CLI tests) inherit it
    config._fieldkit_cache = tempfile.mkdtemp(prefix="fieldkit-test-cache-")
    os.environ["FIELDKIT_CACHE_DIR"] = config._fieldkit_cache


def pytest_unconfigure(config: pytest.Config) -> None:
    path = getattr(config, "_fieldkit_cache", None)
    if path:
        shutil.rmtree(path, ignore_errors=True)


@pytest.hookimpl(trylast=True)
def pytest_sessionfinish(session: pytest.Session, exitstatus: int) -> None:
    if os.environ.get("FIELDKIT_NO_SKIPS") != "1":
        return
    reporter = session.config.pluginmanager.get_plugin("terminalreporter")
    skipped = reporter.stats.get("skipped", []) if reporter else []
    if not skipped:
        return
    reporter.write_line("")
    reporter.write_line(
        f"make test runs every part, but {len(skipped)} test(s) skipped — install what is missing:",
        red=True,
    )
    for rep in skipped[:20]:
        reason = rep.longrepr[2] if isinstance(rep.longrepr, tuple) else str(rep.longrepr)
        reporter.write_line(f"  {rep.nodeid}: {reason}")
    session.exitstatus = pytest.ExitCode.TESTS_FAILED
