"""Pieces shared by the tests and benchmarks; this package holds no tests of its own.

Every test imports them one way, ``from tests.helpers.<module> import ...``, with the project
folder on the path (pyproject's pytest ``pythonpath``; a benchmark adds it itself).
"""
