"""Helpers of fieldkit.plan: input validation."""
