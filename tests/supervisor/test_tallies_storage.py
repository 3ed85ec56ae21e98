"""Weekly tallies equal counts computed independently from the raw synthetic rows."""

from __future__ import annotations

from collections import Counter, defaultdict

import pytest

from clinic_app.storage import db, tallies
from clinic_app.storage.tallies import TallyFilter
from clinic_app.surveillance import quality
from clinic_app.surveillance.agegroups import age_group
from clinic_app.surveillance.isoweek import parse_week
from tests.supervisor.synthetic import iso_label, local_day, store, synthetic_case

WEEKS = ["2026-W51", "2026-W52", "2026-W53", "2027-W01", "2027-W02"]


def expected(rows: list[dict]) -> dict[str, Counter]:
    """Counters per ISO week label, computed from the plain dicts with date.isocalendar."""
    out: dict[str, Counter] = defaultdict(Counter)
    for c in rows:
        if c["quarantined"]:
            continue
        k = out[iso_label(local_day(c))]
        codes = c["classifications"]
        k["cases"] += 1
        k["sev_" + c["severity"]] += 1
        k["plan_" + c["plan"].lower()] += 1
        k["danger_signs"] += "very_severe_disease" in codes
        k["referrals_" + c["refer"]] += c["refer"] != "none"
        k["referrals_completed"] += c["refer"] != "none" and c["referral_made"]
        k["dysentery"] += "dysentery" in codes
        k["persistent_diarrhoea"] += any(x.endswith("persistent_diarrhoea") for x in codes)
        k["severe_acute_malnutrition"] += "severe_acute_malnutrition" in codes
        k["suspected_cholera"] += "suspected_cholera" in codes
        k["outcome_" + {"recovered_home": "recovered", "lost_to_follow_up": "lost"}.get(
            c.get("outcome"), c.get("outcome") or "none")] += 1
        k["ors_sachets"] += c["ors_sachets"]
        k["zinc_tablets"] += c["zinc_tablets"]
        k["dehydrated_given_ors"] += c["severity"] != "none" and c["ors_sachets"] > 0
        k["zinc_advised"] += c["zinc"]
        k["zinc_advised_given"] += c["zinc"] and c["zinc_tablets"] > 0
        k["severe_referred_or_plan_c"] += c["severity"] == "severe" and (
            c["referral_made"] or c["plan"] == "C"
        )
    return out


def got(conn, where=None) -> dict[str, dict]:
    weeks = tallies.weekly_tallies(conn, parse_week(WEEKS[0]), parse_week(WEEKS[-1]), where)
    return {w["week"]: w for w in weeks}


def assert_tallies_match(actual: dict[str, dict], rows: list[dict]):
    want = expected(rows)
    assert list(actual) == WEEKS
    for week in WEEKS:
        for name in tallies.COUNTERS:
            assert actual[week][name] == want[week][name], (week, name)


def test_tallies_equal_independent_counts_across_week_53_and_the_new_year(conn, seeded):
    actual = got(conn)
    assert_tallies_match(actual, seeded)
    assert actual["2026-W53"]["cases"] > 0 and actual["2027-W01"]["cases"] > 0
    assert sum(w["cases"] for w in actual.values()) == sum(not c["quarantined"] for c in seeded)


@pytest.mark.parametrize(
    "field, value",
    [("area", "Kantolo"), ("age_group", "m12_59"), ("age_group", "y15plus"), ("sex", "f"),
     ("sex", "m")],  # fmt: skip
)
def test_each_filter_keeps_only_matching_cases(conn, seeded, field, value):
    def keep(c):
        if field == "age_group":
            return age_group(c["age_months"]) == value
        if field == "sex":
            return c["sex"] == tallies.STORED_SEX[value]
        return (c[field] or "") == value

    assert_tallies_match(got(conn, TallyFilter(**{field: value})), [c for c in seeded if keep(c)])


def test_the_health_worker_filter_keeps_only_their_cases(conn, seeded, users):
    mine = [c for c in seeded if c["user_id"] == users["chw2"]]
    assert_tallies_match(got(conn, TallyFilter(user_id=users["chw2"])), mine)


def test_outcomes_and_status_changes_recorded_later_move_the_tallies(conn, seeded):
    changed = seeded[:40]
    with db.write(conn):
        for i, c in enumerate(changed):
            c["outcome"] = ("recovered_home", "died", "lost_to_follow_up", "admitted")[i % 4]
            conn.execute("UPDATE cases SET outcome = ? WHERE id = ?", (c["outcome"], c["id"]))
        flipped = seeded[40]
        flipped["quarantined"] = not flipped["quarantined"]
        conn.execute(
            "UPDATE cases SET status = ? WHERE id = ?",
            ("quarantined" if flipped["quarantined"] else "active", flipped["id"]),
        )
        gone = seeded.pop(41)
        conn.execute("DELETE FROM cases WHERE id = ?", (gone["id"],))
    assert_tallies_match(got(conn), seeded)


def test_weeks_without_cases_are_listed_with_zeros(conn, seeded):
    weeks = tallies.weekly_tallies(conn, parse_week("2027-W10"), parse_week("2027-W11"))
    assert [w["week"] for w in weeks] == ["2027-W10", "2027-W11"]
    assert all(w[n] == 0 for w in weeks for n in tallies.COUNTERS)


def test_it_rejects_an_unknown_age_group(conn):
    with pytest.raises(ValueError):
        got(conn, TallyFilter(age_group="toddlers"))


def test_the_sql_age_bands_agree_with_the_rules_on_both_sides_of_every_bound(conn, users):
    # The migration repeats the bounds of surveillance/rules.py AGE_GROUPS; this pins them.
    ages = [0, 1.999, 2, 11.999, 12, 59.999, 60, 179.999, 180, 1200]
    for n, age in enumerate(ages):
        case = synthetic_case(__import__("random").Random(n), 9000 + n, [users["chw"]])
        case.update(age_months=age, quarantined=False, created_at="2027-03-01T10:00:00Z")
        store(conn, case)
        band = TallyFilter(age_group=age_group(age))
        total = tallies.weekly_tallies(conn, parse_week("2027-W09"), parse_week("2027-W09"), band)
        assert total[0]["cases"] == sum(age_group(a) == age_group(age) for a in ages[: n + 1])


def test_quality_counters_agree_with_the_pure_indicators(conn, seeded):
    from clinic_app.supervision import quality_from_totals, sum_weeks

    active = [c for c in seeded if not c["quarantined"]]
    rows = [
        quality.QualityCase(
            severity=c["severity"], plan=c["plan"], created_at=None,
            ors_sachets=c["ors_sachets"], zinc_tablets=c["zinc_tablets"],
            zinc_advised=c["zinc"], referral_made=c["referral_made"],
        )  # fmt: skip
        for c in active
    ]
    pure = [quality.ors_given(rows), quality.zinc_given(rows),
            quality.severe_referred_or_plan_c(rows)]  # fmt: skip
    from_sql = quality_from_totals(sum_weeks(list(got(conn).values())))
    assert [(i.key, i.numerator, i.denominator) for i in from_sql] == [
        (i.key, i.numerator, i.denominator) for i in pure
    ]


def test_the_migration_counts_cases_stored_before_it(tmp_path, app, users, conn):
    # A database that already has cases when migration 0020 arrives.
    old = db.connect(str(tmp_path / "old.sqlite3"))
    for number, _name, sql in db.migrations():
        if number < 20:
            old.executescript(f"BEGIN; {sql}; PRAGMA user_version = {number}; COMMIT;")
    old.execute(
        "INSERT INTO users (id, username, role, password_hash, created_at)"
        " VALUES (1, 'w', 'chw', 'h', 't')"
    )
    rng = __import__("random").Random(3)
    rows = [synthetic_case(rng, n, [1]) for n in range(60)]
    for case in rows:
        store(old, case)
    db.migrate(old)
    assert_tallies_match(got(old), rows)
    old.close()
