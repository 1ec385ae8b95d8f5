"""Shared test configuration: hypothesis profiles.

CI (the default profile) runs enough property-based examples to matter and stays within about two
minutes; CALCDOC_FUZZ=long runs many more (a separate, longer run before a release).
"""
from __future__ import annotations

import os

from hypothesis import HealthCheck, settings

settings.register_profile("ci", max_examples=600, deadline=None, derandomize=True, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.register_profile("long", max_examples=5000, deadline=None, print_blob=True,
                          suppress_health_check=[HealthCheck.too_slow])
settings.load_profile("long" if os.environ.get("CALCDOC_FUZZ") == "long" else "ci")
