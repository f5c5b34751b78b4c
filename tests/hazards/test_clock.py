"""build_date and SOURCE_DATE_EPOCH (reproducible-builds.org
specification: decimal seconds since 1970-01-01 00:00:00 UTC; from
memory)."""

import datetime as dt

import pytest

from sitegen.clock import ClockError, build_date


@pytest.mark.parametrize(
    ("value", "date"),
    [
        ("0", dt.date(1970, 1, 1)),
        # 1700000000 s = 2023-11-14 22:13:20 UTC (`date -u -d @1700000000`)
        ("1700000000", dt.date(2023, 11, 14)),
        # 86399 s is the last second of the first day; 86400 the next day
        ("86399", dt.date(1970, 1, 1)),
        ("86400", dt.date(1970, 1, 2)),
    ],
)
def test_epoch_is_read_as_utc(value, date):
    assert build_date({"SOURCE_DATE_EPOCH": value}) == date


@pytest.mark.parametrize("value", [" 1700000000", "1.7e9", "-5", "tomorrow", "17000000000000000"])
def test_bad_values_give_a_clear_error(value):
    with pytest.raises(ClockError, match="SOURCE_DATE_EPOCH"):
        build_date({"SOURCE_DATE_EPOCH": value})


def test_unset_or_empty_is_today():
    today = dt.date.today()
    assert build_date({}) in (today, dt.date.today())
    assert build_date({"SOURCE_DATE_EPOCH": ""}) in (today, dt.date.today())


def test_reads_the_process_environment(monkeypatch):
    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1700000000")
    assert build_date() == dt.date(2023, 11, 14)
