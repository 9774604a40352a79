"""Servers started by the tests compute no geometries unless a test asks (the one place that says so).

Computing starts worker processes and changes the findings of notes; the tests of that
feature (tests/server/test_computed_geometries.py) start their server without this variable.
"""

import os

from notelsp.server.geometries import SWITCH_VARIABLE

os.environ[SWITCH_VARIABLE] = "off"  # inherited by every server subprocess the tests start
# Kept reports would let one test's check answer another's (and tests patch the review in process):
# every check reviews, except in tests/test_report_cache.py, which uses a cache folder of its own.
os.environ["NOTELSP_REPORT_CACHE"] = "off"
