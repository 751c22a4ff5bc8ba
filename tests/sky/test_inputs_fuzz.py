"""Whatever JSON arrives, validation answers with a SkySpec or an InputError — never a traceback
(ARCHITECTURE.md: "Never a traceback, never a silent default")."""

import copy

from hypothesis import given, settings
from hypothesis import strategies as st

from fieldkit.errors import InputError
from fieldkit.sky.inputs import SkySpec, parse_sky_spec

from .test_inputs import GOOD

json_values = st.recursive(
    st.none()
    | st.booleans()
    | st.integers(-(10**6), 10**6)
    | st.floats(allow_nan=False, allow_infinity=False)
    | st.text(max_size=12),
    lambda children: (
        st.lists(children, max_size=4) | st.dictionaries(st.text(max_size=8), children, max_size=4)
    ),
    max_leaves=8,
)
PATHS = [
    ("site",),
    ("site", "lat_deg"),
    ("site", "lon_deg"),
    ("site", "utc_offset_h"),
    ("date",),
    ("solar",),
    ("solar", "f107"),
    ("channels_mhz",),
    ("sounding",),
    ("sounding", "hour_utc"),
    ("sounding", "fof2_mhz"),
    ("schedule",),
    ("schedule", "start_utc"),
    ("power_w",),
    ("mode",),
    ("noise_environment",),
    ("bandwidth_hz",),
    ("required_snr_db",),
]


@settings(max_examples=150, deadline=None)
@given(path=st.sampled_from(PATHS), value=json_values)
def test_any_value_is_accepted_or_refused_by_name(path, value):
    spec = copy.deepcopy(GOOD)
    node = spec
    for key in path[:-1]:
        node = node[key]
    node[path[-1]] = value
    try:
        assert isinstance(parse_sky_spec(spec), SkySpec)
    except InputError as err:
        assert err.field and err.detail
