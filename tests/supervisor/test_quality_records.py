"""The Plan B reassessment and follow-up indicators read the issue-6 records.

Window 4 h +/- 1 h: 4 h from S02 ("after four hours, reassess"), the tolerance from issue 7.
"""

from __future__ import annotations

import random
from datetime import date

from clinic_app.storage import db, followup, tallies
from clinic_app.storage.tallies import TallyFilter
from clinic_app.supervision import quality_for_period, sum_weeks
from clinic_app.surveillance.isoweek import parse_week
from tests.supervisor.synthetic import store, synthetic_case

WEEK = parse_week("2027-W01")


def plan_b_case(conn, n, user_id, area="Mbeza"):
    case = synthetic_case(random.Random(n), 6000 + n, [user_id])
    case.update(created_at="2027-01-05T08:00:00+03:00", severity="some", plan="B", area=area,
                quarantined=False)  # fmt: skip
    store(conn, case)
    return case["id"]


def reassess(conn, case_id, n, at, user_id):
    row = {"id": f"r-{n}", "case_id": case_id, "assessed_at": at, "received_at": at,
           "user_id": user_id, "input": "{}", "result": "{}", "server_result": "{}",
           "engine_mismatch": 0, "payload_hash": f"p{n}", "severity": "none", "plan": "A",
           "transition": "B_to_A", "send_for_iv": 0}  # fmt: skip
    followup.store(conn, "reassessment", row, {})


def indicators(conn, where=None):
    totals = sum_weeks(tallies.weekly_tallies(conn, WEEK, WEEK, where))
    found = quality_for_period(conn, WEEK, WEEK, totals, date(2027, 1, 20), where)
    return {i.key: (i.numerator, i.denominator) for i in found if i is not None}


def test_plan_b_cases_count_as_on_time_only_when_first_reassessed_at_3_to_5_hours(app, users):
    conn = db.connect(app.config["DATABASE"])
    uid = users["nurse"]
    ids = [plan_b_case(conn, n, uid) for n in range(5)]
    with db.write(conn):
        reassess(conn, ids[0], 0, "2027-01-05T12:00:00+03:00", uid)  # 4 h: on time
        reassess(conn, ids[1], 1, "2027-01-05T09:00:00Z", uid)  # 12:00 local = 4 h: on time
        reassess(conn, ids[2], 2, "2027-01-05T10:00:00+03:00", uid)  # 2 h: too early
        reassess(conn, ids[2], 3, "2027-01-05T12:00:00+03:00", uid)  # a later one does not count
        reassess(conn, ids[3], 4, "2027-01-05T14:00:00+03:00", uid)  # 6 h: too late
    # ids[4] is never reassessed: denominator only.
    assert indicators(conn)["plan_b_reassessed_on_time"] == (2, 5)
    assert indicators(conn, TallyFilter(area="Kantolo"))["plan_b_reassessed_on_time"] == (0, 0)


def test_follow_ups_count_when_done_by_their_due_date(app, users):
    conn = db.connect(app.config["DATABASE"])
    uid = users["nurse"]
    ids = [plan_b_case(conn, 10 + n, uid) for n in range(3)]
    with db.write(conn):
        for n, case_id in enumerate(ids):
            followup.store(conn, "outcome", {
                "id": f"o-{n}", "case_id": case_id, "outcome": "recovered_home",
                "at": "2027-01-05T12:00:00+03:00", "received_at": "2027-01-05T12:00:00Z",
                "user_id": uid, "followup_date": "2027-01-07", "payload_hash": f"o{n}"}, {})
    visits = [followup.visits_for(conn, case_id)[0]["id"] for case_id in ids]
    with db.write(conn):
        followup.visit_done(conn, visits[0], uid, "2027-01-07T09:00:00+03:00")  # on the day
        followup.visit_done(conn, visits[1], uid, "2027-01-09T09:00:00+03:00")  # two days late
    # visits[2] never done; all three were due by 20 January.
    assert indicators(conn)["follow_ups_on_time"] == (1, 3)
