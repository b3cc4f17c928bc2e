"""Shared fixtures and hypothesis settings."""

import os

from hypothesis import HealthCheck, settings

settings.register_profile("gearcad", max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("thorough", max_examples=600, deadline=None)
settings.load_profile(os.environ.get("GEARCAD_HYPOTHESIS", "gearcad"))
