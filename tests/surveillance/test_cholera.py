"""GTFCC cholera alert rules (source S27, clinical-facts.md §11.1, reference note §B3.1).

S27: alert when "two or more people aged 2 years or older with acute watery diarrhoea and
severe dehydration, or dying from acute watery diarrhoea, from the same area within 1 week of
one another", or "one death from severe acute watery diarrhoea in a person aged 5 years or older".
"""

from datetime import date, timedelta

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.surveillance.cholera import CaseFact, cholera_alerts, is_suspected_case

DAY = date(2026, 12, 30)


def case(case_id, *, area="Kilima", day=DAY, age=36, awd=True, severe=True, died=False):
    return CaseFact(case_id, area, day, age, awd, severe, died)


def test_two_severe_awd_cases_aged_2_or_more_in_one_area_within_7_days_alert():  # S27
    alerts = cholera_alerts([case("a"), case("b", day=DAY + timedelta(days=7))])
    assert [(a.rule, a.area, a.case_ids) for a in alerts] == [("cluster", "Kilima", ("a", "b"))]
    assert alerts[0].last_day == date(2027, 1, 6)


def test_cases_8_days_apart_do_not_alert():  # S27: "within 1 week" (our reading: <= 7 days)
    assert cholera_alerts([case("a"), case("b", day=DAY + timedelta(days=8))]) == []


def test_a_single_suspected_case_is_not_an_alert():  # reference §B3.1 note
    assert cholera_alerts([case("a")]) == []


@pytest.mark.parametrize(
    "second",
    [
        case("b", area="Mto"),  # another area
        case("b", age=23),  # S27: under 2 years does not count
        case("b", severe=False),  # S27: needs severe dehydration (or death)
        case("b", awd=False),  # S27: bloody or long diarrhoea is not AWD
    ],
    ids=["other-area", "age-23-months", "not-severe", "not-awd"],
)
def test_a_second_case_that_does_not_qualify_raises_no_cluster(second):
    assert cholera_alerts([case("a"), second]) == []


def test_a_death_from_awd_counts_toward_a_cluster_without_severe_dehydration():  # S27
    alerts = cholera_alerts([case("a"), case("b", severe=False, died=True, age=30)])
    assert [a.rule for a in alerts] == ["cluster"]


@pytest.mark.parametrize("age, alerts", [(60, 1), (59, 0), (240, 1)], ids=["5y", "4y11m", "20y"])
def test_one_awd_death_at_age_5_or_more_alerts_on_its_own(age, alerts):  # S27
    found = cholera_alerts([case("d", age=age, severe=False, died=True)])
    assert len([a for a in found if a.rule == "death"]) == alerts


def test_a_death_not_from_awd_raises_no_alert():
    assert cholera_alerts([case("d", age=300, awd=False, died=True)]) == []


def test_cases_chained_within_7_days_of_each_other_make_one_alert():
    days = [DAY, DAY + timedelta(days=6), DAY + timedelta(days=12), DAY + timedelta(days=30)]
    alerts = cholera_alerts([case(f"c{i}", day=d) for i, d in enumerate(days)])
    assert [a.case_ids for a in alerts] == [("c0", "c1", "c2")]
    assert alerts[0].key == "cholera:cluster:Kilima:c0"


def test_suspected_case_needs_age_2_awd_and_severe_or_death():  # S27 suspected-case definition
    assert is_suspected_case(case("a", age=24))
    assert not is_suspected_case(case("a", age=23.9))
    assert is_suspected_case(case("a", severe=False, died=True))
    assert not is_suspected_case(case("a", severe=False))


facts = st.builds(
    CaseFact,
    case_id=st.uuids().map(str),
    area=st.sampled_from(["Kilima", "Mto", "Pwani"]),
    day=st.dates(min_value=date(2026, 12, 1), max_value=date(2027, 2, 1)),
    age_months=st.integers(min_value=0, max_value=900),
    awd=st.booleans(),
    severe=st.booleans(),
    died=st.booleans(),
)


@given(st.lists(facts, max_size=40))
def test_every_cluster_alert_holds_two_suspected_cases_of_one_area(cases):
    by_id = {c.case_id: c for c in cases}
    for alert in cholera_alerts(cases):
        members = [by_id[i] for i in alert.case_ids]
        assert all(m.area == alert.area for m in members)
        if alert.rule == "cluster":
            assert len(members) >= 2 and all(is_suspected_case(m) for m in members)
            gaps = [(b.day - a.day).days for a, b in zip(members, members[1:], strict=False)]
            assert all(0 <= g <= 7 for g in gaps)


@given(st.lists(facts, max_size=40))
def test_any_two_suspected_cases_within_7_days_in_one_area_are_alerted(cases):
    clustered = {i for a in cholera_alerts(cases) if a.rule == "cluster" for i in a.case_ids}
    suspects = [c for c in cases if is_suspected_case(c)]
    for a in suspects:
        for b in suspects:
            if a is not b and a.area == b.area and abs((a.day - b.day).days) <= 7:
                assert a.case_id in clustered
