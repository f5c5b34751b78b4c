"""Pure chemistry core: numbers and small frozen dataclasses in, the same out.

Nothing in this package opens a file or imports yaml, pydantic, jinja2 or
matplotlib; ``tests/test_purity.py`` enforces that.
"""
