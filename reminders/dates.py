"""Calendar arithmetic for re-check due dates, and due dates in words. Plain Python.

A due date is the approval's local date plus a whole number of months. Months differ in
length, so a day that the target month lacks falls back to that month's last day:
31 January + 1 month is 28 February (29 in a leap year), 31 August + 6 months is
28 or 29 February, 30 November + 3 months is 28 or 29 February. The day is never carried
into the month after (31 January + 1 month is never 3 March): a re-check is due "by the
end of February", not in March."""

from __future__ import annotations

import calendar
import datetime


def add_months(day: datetime.date, months: int) -> datetime.date:
    """`day` plus `months` calendar months, the day clamped to the target month's last."""
    if months < 0:
        raise ValueError("months must not be negative")
    index = day.year * 12 + (day.month - 1) + months
    year, month = divmod(index, 12)
    month += 1
    last = calendar.monthrange(year, month)[1]
    return datetime.date(year, month, min(day.day, last))


def _days(count: int) -> str:
    return f"{count} day{'' if count == 1 else 's'}"


def due_words(due_on: datetime.date, today: datetime.date) -> str:
    """'overdue by 12 days', 'due today', 'due tomorrow', 'due in 9 days'."""
    days = (due_on - today).days
    if days < 0:
        return f"overdue by {_days(-days)}"
    if days == 0:
        return "due today"
    if days == 1:
        return "due tomorrow"
    return f"due in {_days(days)}"


def long_date(day: datetime.date) -> str:
    """'14 March 2027' (no leading zero), as the owner's page and the e-mail write it."""
    return f"{day.day} {day:%B %Y}"
