"""Reference cases of calcdoc's software verification: one YAML file per topic (package data).

See README.md in this folder for the case schema; ``calcdoc selftest`` runs them and
``tests/test_verification.py`` runs the same cases one test each.
"""
