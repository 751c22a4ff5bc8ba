"""The channel day: the whole `fieldkit sky` calculation from validated input to the output JSON.

Chain: input → sky estimate (IRI via PyIRI) → sounding → sun → antenna gain per channel (engine,
once per channel) → reach per channel per hour → best channel per hour → schedule recommendation.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from fieldkit.fields import Field, Record, arr, nested, num, string
from fieldkit.sky import path_geometry
from fieldkit.sky.gain import ElevationGain, elevation_gains
from fieldkit.sky.inputs import SkySpec, parse_sky_spec
from fieldkit.sky.iri import sky_estimate
from fieldkit.sky.ranking import best_by_hour, clock_text, recommend, schedule_hours, table_row
from fieldkit.sky.reach import DISTANCES_KM, EXCESS_LOSS_DB, HourReach, Radio, channel_reach
from fieldkit.sky.solar import sunspot_from_f107
from fieldkit.sky.sounding import SOUNDING_SPAN_H, apply_sounding
from fieldkit.sky.sun import solar_zenith_deg, sun_times
from fieldkit.sky.what_works import idle_hours, nvis_ceiling, summary, working_bands

HOURS_UTC = tuple(range(24))
NOTICE = (
    "Monthly-median estimate: on a given day foF2, and with it the usable channels and the skip "
    "zone, can differ from these figures by about ±20 %. Type in a sounding to correct it."
)
SOURCES = {
    "ionosphere": "IRI monthly medians (CCIR foF2 maps) through PyIRI 0.1.7 (Forsythe et al. 2024)",
    "reflection_height": "h = 1490/M(3000)F2 − 176 km (ITU-R P.533 §5.1)",
    "geometry": "spherical earth R = 6371 km, mirror reflection (ITU-R P.533 §5.1)",
    "muf": "secant law with Martyn's theorem, MUF = foF2 sec φ (Davies, Ionospheric Radio, ch. 6)",
    "fot": "FOT = 0.85 × MUF (Federal Standard 1037C)",
    "absorption": "George & Bradley (1974) absorption law at 110 km, night floor per ITU-R P.533",
    "path_loss": f"free-space loss of the slant path (ITU-R P.525) + L_z = {EXCESS_LOSS_DB} dB (ITU-R P.533)",
    "noise": "ITU-R P.372 man-made noise Fa = c − d log f per environment; galactic noise above foF2",
    "sun": "NOAA solar calculator equations (Meeus, Astronomical Algorithms)",
    "sunspot_relation": "F10.7 = 63.7 + 0.728 R12 + 0.00089 R12² (ITU-R P.371-8)",
}
LIMITATIONS = (
    "one-hop F2 mode only (no E-layer modes)",
    "ordinary wave only: the extraordinary wave reflects up to about fH/2 above foF2",
    "atmospheric (lightning) noise is not included",
    "one reflection height per hour for all channels",
)


def _round(values, digits=2) -> list[float]:
    return [round(float(v), digits) for v in values]


def _local(hour: float | None, offset: float | None) -> str | None:
    if hour is None or offset is None:
        return None
    return clock_text(hour + offset)


SKY_RESULT = Record(
    "SkyResult",
    (
        string("notice", required=True),
        nested("site", required=True),
        string("date", required=True, schema={"format": "date"}),
        nested("solar", required=True),
        nested("radio", required=True),
        nested(
            "antenna",
            required=True,
            description="the given model spec, the default dipole, or the planned hung wire",
        ),
        arr("hours_utc", required=True),
        arr("local_times", required=True),
        arr("fof2_mhz", required=True, description="per hour"),
        arr("hmf2_km", required=True),
        arr("reflection_height_km", required=True),
        arr("muf3000_mhz", required=True),
        arr("fot_mhz", required=True),
        arr("sky_source", required=True, schema={"items": {"type": "string"}}),
        arr("solar_zenith_deg", required=True),
        num("gyro_frequency_mhz", "MHz", required=True),
        Field(
            "sunrise_utc", required=True, description="HH:MM, or null when the sun does not rise"
        ),
        Field("sunset_utc", required=True),
        Field("sunrise_local", required=True),
        Field("sunset_local", required=True),
        Field("solar_noon_utc", required=True),
        Field("polar", required=True),
        arr("distances_km", required=True),
        arr(
            "channels",
            required=True,
            description="per channel: by_hour rows (skip_km, max_range_km, verdict, snr_db)",
            schema={"items": {"type": "object"}},
        ),
        arr("best_by_hour", required=True, schema={"items": {"type": "object"}}),
        nested(
            "schedule",
            required=True,
            nullable=True,
            description="with a schedule input; when_none_works at hours no channel works",
        ),
        Field("sources", required=True),
        arr("limitations", required=True, schema={"items": {"type": "string"}}),
        nested("sounding", description="with a sounding input"),
        nested(
            "nvis_ceiling",
            required=True,
            description="the day's largest foF2 (frequency_mhz, hour_utc): the top of the NVIS range",
        ),
    ),
    "the `fieldkit sky` result: the channel day",
)


@dataclass(frozen=True)
class SkyContext:
    """The sky estimate for one site and day, computed once: what every channel's reach is worked from.

    Attributes
    ----------
    spec : the validated input
    sky : the IRI estimate after the sounding [MHz, km]
    zenith_deg : solar zenith angle per hour [deg]
    sun : sunrise, sunset, noon
    sunspot_number : R12 for the absorption law
    radio : power, bandwidth and required SNR
    """

    spec: SkySpec
    sky: Any
    zenith_deg: Any
    sun: Any
    sunspot_number: float
    radio: Radio

    def reach(self, frequency_mhz: float, gain: ElevationGain, hours=None) -> list[HourReach]:
        """Reach of one channel with this antenna gain, every hour (or the hour indices given)."""
        idx = list(range(len(self.sky.hours_utc))) if hours is None else list(hours)
        return channel_reach(
            frequency_mhz=frequency_mhz,
            gain=gain,
            hours_utc=np.asarray(self.sky.hours_utc)[idx],
            fof2_mhz=np.asarray(self.sky.fof2_mhz)[idx],
            reflection_height_km=np.asarray(self.sky.reflection_height_km)[idx],
            solar_zenith_deg=np.asarray(self.zenith_deg)[idx],
            gyro_frequency_mhz=self.sky.gyro_frequency_mhz,
            sunspot_number=self.sunspot_number,
            radio=self.radio,
            noise_environment=self.spec.noise_environment,
        )


def sky_context(spec: SkySpec) -> SkyContext:
    """The estimate, the sounding, the sun and the radio for a validated input."""
    estimate = sky_estimate(
        day=spec.day,
        lat_deg=spec.lat_deg,
        lon_deg=spec.lon_deg,
        f107=spec.f107,
        hours_utc=HOURS_UTC,
    )
    sky = apply_sounding(estimate, spec.sounding)
    zenith = solar_zenith_deg(
        day=spec.day, utc_hours=sky.hours_utc, lat_deg=spec.lat_deg, lon_deg=spec.lon_deg
    )
    sun = sun_times(day=spec.day, lat_deg=spec.lat_deg, lon_deg=spec.lon_deg)
    r12 = (
        spec.sunspot_number
        if spec.sunspot_number is not None
        else sunspot_from_f107(f107=spec.f107)
    )
    radio = Radio(
        power_w=spec.power_w,
        bandwidth_hz=spec.mode.bandwidth_hz,
        required_snr_db=spec.mode.required_snr_db,
        mode=spec.mode.name,
    )
    return SkyContext(spec, sky, zenith, sun, r12, radio)


def channel_day(
    spec: SkySpec, *, gains: Mapping[float, ElevationGain] | None = None
) -> dict[str, Any]:
    """Compute the channel day for a validated input (see :func:`sky_json`).

    ``gains``, when given, is the antenna gain against elevation per channel [MHz] of the antenna
    being planned (:func:`fieldkit.sky.gain.elevation_gain_of` on its engine solution); the channels
    it does not hold use the spec's antenna or the default dipole.
    """
    ctx = sky_context(spec)
    sky, zenith, sun, r12 = ctx.sky, ctx.zenith_deg, ctx.sun, ctx.sunspot_number
    hours = sky.hours_utc
    gains = dict(gains or {})
    missing = [f for f in spec.channels_mhz if f not in gains]
    if missing:
        gains.update(
            zip(
                missing,
                elevation_gains(frequencies_mhz=missing, antenna=spec.antenna, ground=spec.ground),
                strict=True,
            )
        )

    per_channel = []
    channels_out = []
    for f in spec.channels_mhz:
        gain = gains[f]
        rows = ctx.reach(f, gain)
        per_channel.append((f, rows))
        channels_out.append(
            {
                "frequency_mhz": f,
                "antenna": {
                    "zenith_gain_dbi": round(gain.zenith_gain_dbi, 2),
                    "swr": round(gain.swr, 2),
                    "radiation_efficiency": round(gain.radiation_efficiency, 3),
                    "elevation_deg": _round(gain.elevation_deg, 1),
                    "gain_dbi": _round(gain.gain_dbi, 2),
                },
                "by_hour": [
                    {
                        "hour_utc": int(r.hour_utc),
                        "local_time": _local(r.hour_utc, spec.utc_offset_h),
                        "skip_km": r.skip_km,
                        "fot_skip_km": r.fot_skip_km,
                        "covers_km": None if r.covers_km is None else list(r.covers_km),
                        "max_range_km": r.max_range_km,
                        "nvis_snr_db": r.nvis_snr_db,
                        "below_fot": r.below_fot,
                        "verdict": r.verdict,
                        "absorption_db": r.absorption_db,
                        "noise_fa_db": r.noise_fa_db,
                        "snr_db": list(r.snr_db),
                    }
                    for r in rows
                ],
            }
        )

    distances = spec.schedule.distances_km if spec.schedule else None
    best = best_by_hour(per_channel, distances)
    for row in best:
        row["hour_utc"] = int(row["hour_utc"])
        row["local_time"] = _local(row["hour_utc"], spec.utc_offset_h)

    out: dict[str, Any] = {
        "notice": NOTICE,
        "site": {
            "lat_deg": spec.lat_deg,
            "lon_deg": spec.lon_deg,
            "utc_offset_h": spec.utc_offset_h,
        },
        "date": spec.day.isoformat(),
        "solar": {
            "f107": round(spec.f107, 1),
            "sunspot_number": round(r12, 1),
            "given": spec.solar_given,
        },
        "radio": {
            "power_w": spec.power_w,
            "mode": spec.mode.name,
            "bandwidth_hz": spec.mode.bandwidth_hz,
            "required_snr_db": spec.mode.required_snr_db,
            "mode_source": spec.mode.source,
            "noise_environment": spec.noise_environment,
            "defaults_used": list(spec.defaults_used),
        },
        "antenna": (
            {
                "kind": "planned",
                "description": "the planned hung wire (gain from the plan's own engine solution)",
                "channels_mhz": sorted(f for f in spec.channels_mhz if f not in missing),
            }
            if len(missing) < len(spec.channels_mhz)
            else {"kind": "given", "spec": spec.antenna}
            if spec.antenna is not None
            else {
                "kind": "default",
                "description": "centre-fed wire half-wave dipole (468/f ft), 0.15 wavelength high, cut for each channel",
                "ground": spec.ground if spec.ground is not None else "average",
            }
        ),
        "hours_utc": list(HOURS_UTC),
        "local_times": [_local(h, spec.utc_offset_h) for h in hours],
        "fof2_mhz": _round(sky.fof2_mhz),
        "hmf2_km": _round(sky.hmf2_km, 1),
        "reflection_height_km": _round(sky.reflection_height_km, 1),
        "muf3000_mhz": _round(sky.muf3000_mhz),
        "fot_mhz": _round(path_geometry.fot_mhz(muf_mhz=sky.fof2_mhz)),
        "sky_source": list(sky.source),
        "solar_zenith_deg": _round(zenith, 1),
        "gyro_frequency_mhz": round(sky.gyro_frequency_mhz, 3),
        "sunrise_utc": clock_text(sun.sunrise_utc_h),
        "sunset_utc": clock_text(sun.sunset_utc_h),
        "sunrise_local": _local(sun.sunrise_utc_h, spec.utc_offset_h),
        "sunset_local": _local(sun.sunset_utc_h, spec.utc_offset_h),
        "solar_noon_utc": clock_text(sun.solar_noon_utc_h),
        "polar": sun.polar,
        "distances_km": _round(DISTANCES_KM, 0),
        "channels": channels_out,
        "best_by_hour": best,
        "schedule": _schedule(ctx, per_channel, gains) if spec.schedule else None,
        "nvis_ceiling": dict(
            zip(("frequency_mhz", "hour_utc"), _ceiling(ctx), strict=True),
            why="the day's largest foF2: above it no frequency comes back from straight overhead",
        ),
        "sources": SOURCES,
        "limitations": list(LIMITATIONS),
    }
    if spec.sounding is not None:
        out["sounding"] = {
            "hour_utc": spec.sounding.hour_utc,
            "fof2_mhz": spec.sounding.fof2_mhz,
            "virtual_height_km": spec.sounding.virtual_height_km,
            "hmf2_km": spec.sounding.hmf2_km,
            "muf3000_mhz": spec.sounding.muf3000_mhz,
            "applies_to": (
                "all 24 hours: no hour_utc given, so the reading replaces the estimate all day; "
                "give hour_utc to apply it near its hour only"
                if spec.sounding.hour_utc is None
                else f"its hour, fading out over {SOUNDING_SPAN_H:g} h either side"
            ),
        }
    return SKY_RESULT.written(out)


def _nearest(gains: Mapping[float, ElevationGain], f: float) -> ElevationGain:
    return gains[min(gains, key=lambda c: abs(np.log(c / f)))]


def _schedule(ctx: SkyContext, per_channel, gains) -> dict[str, Any]:
    """The schedule's recommendation; when no channel works at some of its hours, what would."""
    sched = ctx.spec.schedule
    out = recommend(sched, per_channel, ctx.sky.hours_utc)
    idle = idle_hours(sched, per_channel, ctx.sky.hours_utc)
    if idle:
        bands = working_bands(
            ctx, idle, lambda f: _nearest(gains, f), distances_km=sched.distances_km
        )
        out["when_none_works"] = summary(bands, sched.distances_km)
    return out


def schedule_fit(ctx: SkyContext, gains: Mapping[float, ElevationGain]) -> dict[str, Any]:
    """The schedule's table and recommendation with the given antenna gain per channel [MHz] (and,
    at hours no channel works, what would); the channels without a gain use the spec's antenna or
    the default dipole."""
    gains = dict(gains)
    missing = [f for f in ctx.spec.channels_mhz if f not in gains]
    if missing:
        found = elevation_gains(
            frequencies_mhz=missing, antenna=ctx.spec.antenna, ground=ctx.spec.ground
        )
        gains.update(zip(missing, found, strict=True))
    per_channel = [(f, ctx.reach(f, gains[f])) for f in ctx.spec.channels_mhz]
    return _schedule(ctx, per_channel, gains)


def schedule_row(
    ctx: SkyContext, frequency_mhz: float, gain: ElevationGain
) -> dict[str, Any] | None:
    """One channel's row of the schedule table with this antenna gain (None without a window)."""
    sched = ctx.spec.schedule
    idx = schedule_hours(sched, ctx.sky.hours_utc) if sched is not None else []
    if not idx:
        return None
    return table_row(sched, frequency_mhz, ctx.reach(frequency_mhz, gain), idx)


def _ceiling(ctx: SkyContext) -> tuple[float, int]:
    f, hour = nvis_ceiling(ctx)
    return round(f, 2), hour


def sky_json(spec: dict, *, gains: Mapping[float, ElevationGain] | None = None) -> dict:
    """The `fieldkit sky` calculation: JSON input in, JSON output out.

    Parameters
    ----------
    spec : dict
        The sky input of ARCHITECTURE.md: ``site`` (``lat_deg``, ``lon_deg``, optional
        ``utc_offset_h`` and ``ground``), ``date`` (UTC day, YYYY-MM-DD), ``solar`` (``f107`` [sfu]
        or ``sunspot_number``), ``channels_mhz``, optional ``sounding`` (``fof2_mhz``,
        ``virtual_height_km``, optional ``hour_utc``, ``hmf2_km``, ``muf3000_mhz``), ``antenna`` (a model spec),
        ``power_w`` [W], ``mode`` ("ssb", "cw", "am", "data"), ``bandwidth_hz``,
        ``required_snr_db``, ``noise_environment`` ("quiet-rural", "rural", "residential",
        "business") and ``schedule`` (``start_utc``, ``end_utc`` as HH:MM, optional
        ``distances_km``).

    Returns
    -------
    dict
        ``hours_utc``, ``fof2_mhz``, ``hmf2_km`` per hour, ``sunrise_utc``, ``sunset_utc``,
        ``channels`` with ``by_hour`` rows (``skip_km``, ``max_range_km``, ``verdict``, ``snr_db`` on
        ``distances_km``), ``best_by_hour``, ``schedule`` and the notice that it is a monthly median.

    Raises
    ------
    fieldkit.errors.InputError
        For any bad input, naming the field.
    """
    return channel_day(parse_sky_spec(spec), gains=gains)
