"""Lossy ground (Sommerfeld half-space): lands in the next step."""

from __future__ import annotations

from fieldkit.errors import InputError


def lossy_ground_matrix(mesh, ground, frequency_hz):
    raise InputError(
        "ground", "lossy ground not yet available in this build; use perfect or free-space"
    )


def reflected_near_field(sol, points):
    raise InputError(
        "ground", "lossy ground not yet available in this build; use perfect or free-space"
    )
