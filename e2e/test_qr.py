"""The app's own QR encoder (web/js/qr.js) against segno, an independent encoder of ISO/IEC 18004.

For the same text, version and mask the two must produce the same module matrix; with free choice the
app's symbol must still be one segno would accept as a valid encoding of the text (same version, and
the same matrix as segno's for the mask the app chose).

Notes
-----
segno 1.6 adds eight padding bits when the bit stream already ends on a codeword boundary (its
``write_padding_bits`` extends by ``8 - length % 8``), so its symbols carry a 0x00 data codeword where
ISO/IEC 18004:2015 7.4.10 puts the first pad codeword 11101100 ("if the bit stream length is such that
it does not end at a codeword boundary, padding bits ... shall be added"). Both decode to the same
text. The reference below runs segno with that one step as the standard words it.
"""

from __future__ import annotations

import pytest
import segno
import segno.consts
import segno.encoder

from e2e.conftest import Service

pytestmark = pytest.mark.browser

TEXTS = [
    "fieldkit",
    "http://192.168.4.1:8765/?key=Zq3v9xY0aBcDeFgHiJkLmNoPqRsTuVwX",
    "fieldkit field card\nLarch Basin relay camp (demo)\n3.79 MHz flat\nRopes: T1 10.0 m, T2 10.0 m\n"
    "Legs: 19.12 m + 19.12 m\nWrap 0.15 m each end; total wire 38.84 m\nFeedpoint 9.4 m\n"
    "Keep-out 0.0 m while sending",
    "keep-out ≥ 2.4 m",  # not Latin-1: both encoders use UTF-8 bytes
]


@pytest.fixture(scope="module")
def service(tmp_path_factory):
    svc = Service(tmp_path_factory.mktemp("qr") / "data", demo=False)
    svc.start()
    yield svc
    svc.stop()


def _standard_padding(buff, version, length):
    """ISO/IEC 18004:2015 7.4.10: zero bits up to the codeword boundary, none when already on it."""
    if version not in (segno.consts.VERSION_M1, segno.consts.VERSION_M3) and length % 8:
        buff.extend([0] * (8 - length % 8))


@pytest.fixture(autouse=True)
def standard_segno(monkeypatch):
    monkeypatch.setattr(segno.encoder, "write_padding_bits", _standard_padding)


def segno_matrix(text, version, mask):
    qr = segno.make(
        text, error="m", mode="byte", version=version, mask=mask, boost_error=False, micro=False
    )
    return [[bool(v) for v in row] for row in qr.matrix], qr.version


def js_encode(page, text, opts):
    return page.evaluate(
        "async ([t, o]) => { const m = await import('/js/qr.js'); return m.encodeQr(t, o); }",
        [text, opts],
    )


def test_matrices_match_segno_for_every_mask(open_app):
    page = open_app("laptop")
    for text in TEXTS:
        for mask in range(8):
            got = js_encode(page, text, {"mask": mask})
            want, version = segno_matrix(text, None, mask)
            assert got["version"] == version, (text, mask)
            assert got["modules"] == want, f"matrix differs for {text!r}, mask {mask}"


@pytest.mark.parametrize("version", [1, 2, 6, 7, 9, 10, 14, 15])
def test_each_version_layout_matches_segno(open_app, version):
    page = open_app("laptop")
    text = "NVIS"
    got = js_encode(page, text, {"version": version, "mask": version % 8})
    want, _ = segno_matrix(text, version, version % 8)
    assert got["size"] == 17 + 4 * version  # ISO/IEC 18004:2015, 5.3.1
    assert got["modules"] == want


def test_free_mask_choice_is_a_valid_symbol(open_app):
    page = open_app("laptop")
    for text in TEXTS:
        got = js_encode(page, text, {})
        want, version = segno_matrix(text, None, got["mask"])
        assert got["version"] == version
        assert got["modules"] == want


def test_too_long_text_is_refused(open_app):
    page = open_app("laptop")
    message = page.evaluate(
        "async () => { const m = await import('/js/qr.js');"
        " try { m.encodeQr('x'.repeat(500)); return 'no error'; } catch (e) { return e.message; } }"
    )
    assert "too long" in message
