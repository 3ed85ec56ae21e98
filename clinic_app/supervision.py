"""The supervisor's numbers: joins storage (tallies, stock, alerts) to the pure surveillance
methods. No SQL here and no Flask: the connection and today's date are parameters.
"""

from __future__ import annotations

from dataclasses import asdict
from datetime import UTC, date, datetime, timedelta

from clinic_app.clinical.rulebook import RULES
from clinic_app.storage import alerts as alert_store
from clinic_app.storage import stock as stock_store
from clinic_app.storage import tallies
from clinic_app.surveillance import quality
from clinic_app.surveillance import stock as stock_math
from clinic_app.surveillance.cholera import CaseFact, cholera_alerts
from clinic_app.surveillance.ears import METHODS, ears, min_history
from clinic_app.surveillance.isoweek import IsoWeek, local_date, week_of
from clinic_app.surveillance.quality import Indicator
from clinic_app.surveillance.rules import (
    CHOLERA_CLUSTER_WINDOW_DAYS,
    CHOLERA_SUSPECT_MIN_AGE_MONTHS,
    STOCK_AVERAGE_WEEKS,
)

# A large outbreak can chain hundreds of cases; the alert lists the first ones and the count.
ALERT_CASE_IDS_SHOWN = 50
# Enough weekly history for C3 (11 earlier weeks) plus the evaluated week.
EARS_WEEKS = min_history("C3") + 1


def last_complete_week(today: date) -> IsoWeek:
    """The week before the one holding ``today``: the latest week with all its days."""
    return week_of(today).shift(-1)


def quality_from_totals(totals: dict) -> list[Indicator]:
    """The case-level indicators from summed tally counters (same definitions as
    surveillance.quality; tests/storage/test_tallies.py checks the two agree)."""
    return [
        Indicator(
            "ors_given", totals["dehydrated_given_ors"], totals["sev_some"] + totals["sev_severe"]
        ),
        Indicator("zinc_given", totals["zinc_advised_given"], totals["zinc_advised"]),
        Indicator(
            "severe_referred_or_plan_c", totals["severe_referred_or_plan_c"], totals["sev_severe"]
        ),
    ]


def _moment(text: str) -> datetime:
    moment = datetime.fromisoformat(text.replace("Z", "+00:00"))
    return moment if moment.tzinfo else moment.replace(tzinfo=UTC)


def quality_for_period(conn, first: IsoWeek, last: IsoWeek, totals: dict, today: date,
                       where: tallies.TallyFilter | None = None) -> list:  # fmt: skip
    """All five indicators for the weeks ``first`` .. ``last`` and the same filter as ``totals``.

    The first three come from the tally counters; the Plan B reassessment and follow-up
    indicators from the issue-6 records, or None when those tables are absent.
    """
    out: list[Indicator | None] = list(quality_from_totals(totals))
    lo, hi = first.monday.isoformat(), last.shift(1).monday.isoformat()
    rows = tallies.plan_b_reassessments(conn, lo, hi, where)
    if rows is None:
        out.append(None)
    else:
        first_seen: dict[str, quality.QualityCase] = {}
        for r in rows:
            case = quality.QualityCase(severity="some", plan="B",
                                       created_at=_moment(r["created_at"]),
                                       reassessed_at=_moment(r["assessed_at"]))  # fmt: skip
            known = first_seen.get(r["id"])
            if known is None or case.reassessed_at < known.reassessed_at:
                first_seen[r["id"]] = case
        on_time = quality.plan_b_reassessed_on_time(first_seen.values())
        # Plan B cases never reassessed count in the denominator only.
        out.append(Indicator(on_time.key, on_time.numerator, totals["plan_b"]))
    visits = tallies.follow_up_visits(conn, lo, hi, where)
    out.append(None if visits is None else quality.follow_ups_on_time(
        (quality.QualityCase(
            severity="none", plan=None, created_at=None,
            follow_up_due=date.fromisoformat(v["due_date"]),
            follow_up_done=(local_date(v["done_at"])
                            if v["status"] == "done" and v["done_at"] else None))
         for v in visits), today))  # fmt: skip
    return out


def sum_weeks(weeks: list[dict]) -> dict:
    """Counter totals over several weekly tallies."""
    return {name: sum(w[name] for w in weeks) for name in tallies.COUNTERS}


def ears_by_area(conn, week: IsoWeek) -> dict[str, dict]:
    """C1, C2 and C3 for ``week`` in every area with cases in the weeks before it."""
    counts = tallies.weekly_counts_by_area(conn, week.shift(1 - EARS_WEEKS), week)
    return {area: {m: ears(series, m) for m in METHODS} for area, series in counts.items()}


def stock_overview(conn, today: date, low_weeks: float) -> list[stock_math.StockStatus]:
    """On hand, recent weekly use and weeks left for each item."""
    moved = stock_store.totals(conn)
    used = tallies.consumption_totals(conn)
    last = last_complete_week(today)
    recent = tallies.weekly_tallies(conn, last.shift(1 - STOCK_AVERAGE_WEEKS), last)
    out = []
    for item in stock_store.ITEMS:
        stock = stock_math.on_hand(moved[item]["received"], moved[item]["adjusted"], used[item])
        out.append(
            stock_math.stock_status(
                item, stock, [w[item] for w in recent], low_weeks=low_weeks
            )
        )
    return out


def _cholera_facts(conn, today: date) -> list[CaseFact]:
    # Twice the window: a cluster whose first case is a week old is still found.
    since = today - timedelta(days=2 * CHOLERA_CLUSTER_WINDOW_DAYS)
    acute_below = RULES["cholera"]["acute_max_days_exclusive"]
    facts = []
    for row in alert_store.cholera_case_rows(
        conn, since.isoformat(), (today + timedelta(days=1)).isoformat(),
        CHOLERA_SUSPECT_MIN_AGE_MONTHS,  # both rules need at least this age
    ):
        acute = row["days"] is None or row["days"] < acute_below
        facts.append(
            CaseFact(
                case_id=row["id"],
                area=row["area"],
                day=local_date(row["created_at"]),
                age_months=row["age_months"],
                awd=acute and not row["blood"],
                severe=row["severity"] == "severe" or bool(row["suspected_cholera"]),
                died=row["outcome"] == "died",
            )
        )
    return facts


def refresh_alerts(conn, today: date, raised_at: str, low_weeks: float) -> int:
    """Raise any new cholera, EARS and low-stock alerts; return how many are new.

    Call inside a write transaction.
    """
    new = 0
    for alert in cholera_alerts(_cholera_facts(conn, today)):
        new += alert_store.upsert(
            conn, key=alert.key, kind="cholera_" + alert.rule, area=alert.area,
            week=str(week_of(alert.last_day)), raised_at=raised_at,
            detail={"cases": len(alert.case_ids),
                    "case_ids": list(alert.case_ids[:ALERT_CASE_IDS_SHOWN]),
                    "first_day": alert.first_day.isoformat(),
                    "last_day": alert.last_day.isoformat()},
        )  # fmt: skip
    week = last_complete_week(today)
    for area, results in ears_by_area(conn, week).items():
        fired = {m: asdict(r) for m, r in results.items() if r.alarm}
        if fired:
            new += alert_store.upsert(
                conn, key=f"ears:{area}:{week}", kind="ears", area=area, week=str(week),
                raised_at=raised_at, detail={"methods": fired},
            )  # fmt: skip
    for status in stock_overview(conn, today, low_weeks):
        if status.low:
            new += alert_store.upsert(
                conn, key=f"low_stock:{status.item}:{week_of(today)}", kind="low_stock",
                area="", week=str(week_of(today)), raised_at=raised_at, detail=asdict(status),
            )  # fmt: skip
    return new
