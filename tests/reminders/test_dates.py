"""Re-check due dates: calendar months added to the approval's date, the day clamped to
the end of a shorter month, and due dates in words."""

from __future__ import annotations

import datetime

import pytest

from reminders.dates import add_months, due_words, long_date

D = datetime.date


@pytest.mark.parametrize(
    ("start", "months", "due"),
    [
        # Gregorian month lengths (ISO 8601): February 2027 has 28 days, 2028 is a leap
        # year (divisible by 4, not a century), April has 30 days. The end-of-month
        # convention (a day the month lacks becomes its last day, never spills into the
        # next month) is common practice for "N months from" dates.
        (D(2027, 1, 31), 1, D(2027, 2, 28)),
        (D(2028, 1, 31), 1, D(2028, 2, 29)),
        (D(2026, 8, 31), 6, D(2027, 2, 28)),
        (D(2027, 8, 31), 6, D(2028, 2, 29)),
        (D(2027, 3, 31), 1, D(2027, 4, 30)),
        (D(2026, 12, 31), 1, D(2027, 1, 31)),
        (D(2028, 2, 29), 12, D(2029, 2, 28)),
        (D(2028, 2, 29), 48, D(2032, 2, 29)),
        (D(2026, 11, 30), 3, D(2027, 2, 28)),
        (D(2026, 3, 14), 12, D(2027, 3, 14)),
        (D(2026, 7, 15), 6, D(2027, 1, 15)),
        (D(2026, 1, 10), 60, D(2031, 1, 10)),
    ],
)
def test_months_are_calendar_months_clamped_to_the_month_end(start, months, due):
    assert add_months(start, months) == due


def test_zero_months_is_the_same_day_and_negative_months_are_refused():
    assert add_months(D(2027, 1, 31), 0) == D(2027, 1, 31)
    with pytest.raises(ValueError):
        add_months(D(2027, 1, 31), -1)


@pytest.mark.parametrize(
    ("due", "words"),
    [
        (D(2027, 3, 2), "overdue by 12 days"),
        (D(2027, 3, 13), "overdue by 1 day"),
        (D(2027, 3, 14), "due today"),
        (D(2027, 3, 15), "due tomorrow"),
        (D(2027, 3, 23), "due in 9 days"),
    ],
)
def test_due_dates_in_words_count_calendar_days(due, words):
    assert due_words(due, D(2027, 3, 14)) == words


def test_long_dates_are_written_out_without_a_leading_zero():
    assert long_date(D(2027, 3, 4)) == "4 March 2027"
    assert long_date(D(2027, 12, 14)) == "14 December 2027"
