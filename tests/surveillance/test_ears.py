"""EARS C1, C2 and C3 against hand-worked values built from the published definitions.

Definitions: R package `surveillance` man/earsC.Rd and R/earsC.R (rules.py source R-EARSC),
as set out in shared/reference/growth-and-surveillance.md §B1. The §B2 and §B1.4 values were
computed by hand in that note; the "own series" values are hand-worked in the comments here.
"""

import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from clinic_app.surveillance.ears import default_threshold, ears, ears_series, min_history

# Reference §B2: weekly AWD counts for one clinic, weeks 1-12 (index = week - 1).
B2 = [4, 6, 5, 3, 7, 5, 4, 6, 5, 9, 14, 20]
# Reference §B1.4: a flat series with a spike in week 12.
SPIKE = [4, 6, 5, 3, 7, 5, 4, 6, 5, 5, 5, 20]


@pytest.mark.parametrize(
    "week, mean, sd, value",
    [
        (9, 5.1429, 1.3452, -0.1062),
        (10, 5.0000, 1.2910, 3.0984),
        (11, 5.5714, 1.9881, 4.2396),
        (12, 7.1429, 3.4365, 3.7413),
    ],
    ids=lambda v: f"B2-week{v}" if isinstance(v, int) else None,
)
def test_c1_matches_the_reference_b2_table(week, mean, sd, value):  # reference §B2
    result = ears(B2, "C1", week - 1)
    assert result.baseline_mean == pytest.approx(mean, abs=5e-5)
    assert result.baseline_sd == pytest.approx(sd, abs=5e-5)
    assert result.value == pytest.approx(value, abs=5e-5)


@pytest.mark.parametrize(
    "week, mean, sd, value",
    [(10, 4.8571, 1.3452, 3.0798), (11, 5.1429, 1.3452, 6.5843), (12, 5.0000, 1.2910, 11.6190)],
)
def test_c2_matches_the_reference_b2_table(week, mean, sd, value):  # reference §B2
    result = ears(B2, "C2", week - 1)
    assert (result.baseline_mean, result.baseline_sd) == (
        pytest.approx(mean, abs=5e-5),
        pytest.approx(sd, abs=5e-5),
    )
    assert result.value == pytest.approx(value, abs=5e-5)


@pytest.mark.parametrize(
    "method, week, upper",
    [
        ("C1", 10, 8.8730),
        ("C1", 11, 11.5356),
        ("C1", 12, 17.4524),
        ("C2", 10, 8.8927),
        ("C2", 11, 9.1784),
        ("C2", 12, 8.8730),
    ],
)
def test_upper_bounds_with_z_3_match_the_reference(method, week, upper):  # reference §B2
    assert ears(B2, method, week - 1, z=3).upper_bound == pytest.approx(upper, abs=5e-5)


def test_c3_at_week_12_of_b2_is_18_283_and_alarms():  # reference §B2
    result = ears(B2, "C3")
    assert result.value == pytest.approx(18.2830, abs=5e-4)
    assert result.alarm


def test_week_10_is_just_over_the_c1_threshold_but_not_the_c2_one():
    # reference §B2: C1 = 3.098 > 3.090 alarms; C2 = 3.0798 < 3.0902 does not (R's z).
    assert ears(B2, "C1", 9).alarm
    assert not ears(B2, "C2", 9).alarm
    assert ears(B2, "C2", 9, z=3).alarm  # classic rounded threshold 3 (Hutwagner, from memory)


def test_classic_c3_catches_the_spike_that_r_misses():
    # reference §B1.4: classic C3 at week 12 = 10.62, alarm; threshold on Y12 = 8.87 (z = 2).
    result = ears(SPIKE, "C3", z=2)
    assert result.value == pytest.approx(10.62, abs=5e-3)
    assert result.upper_bound == pytest.approx(8.87, abs=5e-3)
    assert result.alarm


# Own series, hand-worked: weeks 0-6 = 1,3,1,3,1,3,2 have mean 2 and squared deviations
# 1,1,1,1,1,1,0 (sum 6, /6 = 1), so SD = 1; weeks 1-7 (3,1,3,1,3,2,1) and 2-8 (1,3,1,3,2,1,3)
# are the same numbers reordered: mean 2, SD 1. Hence C2(t) = Y(t) - 2 for t = 9, 10, 11.
OWN = [1, 3, 1, 3, 1, 3, 2, 1, 3]


def test_own_series_c1_is_exactly_3_when_the_count_is_mean_plus_3_sd():
    result = ears([1, 3, 1, 3, 1, 3, 2, 5], "C1", z=3)
    assert (result.baseline_mean, result.baseline_sd, result.value) == (2, 1, 3)
    assert not result.alarm  # 3 is not above 3: the alarm needs a count above U = 5


def test_own_series_c3_adds_the_excess_of_three_weeks():
    # Y9 = 4, Y10 = 2, Y11 = 6 -> C2 = 2, 0, 4 -> excess 1, 0, 3 -> C3 = 4.
    # Upper bound on Y11 = 2 + 1 * (1 + 1.96 - 1) = 3.96.
    result = ears(OWN + [4, 2, 6], "C3")
    assert result.value == pytest.approx(4.0)
    assert result.upper_bound == pytest.approx(2 + default_threshold("C3"))
    assert result.alarm


def test_c3_alarms_on_the_previous_weeks_alone_when_their_excess_passes_z():
    # Y9 = 5, Y10 = 3 -> excess 2 + 0 = 2 > 1.96: any count this week alarms, even 0.
    result = ears(OWN + [5, 3, 0], "C3")
    assert result.value == pytest.approx(2.0)
    assert result.upper_bound is None
    assert result.alarm


def test_sparse_baseline_of_zeros_uses_min_sigma():
    # reference §B2 sparse edge case: baseline 0 x 7, minSigma 0.5, z = 3 -> U = 1.5.
    one, two = ears([0] * 7 + [1], "C1", z=3), ears([0] * 7 + [2], "C1", z=3)
    assert one.upper_bound == two.upper_bound == 1.5
    assert (one.alarm, two.alarm) == (False, True)
    assert one.sigma == 0.5 and one.baseline_sd == 0


def test_without_min_sigma_a_constant_baseline_leaves_the_statistic_undefined():
    # R-EARSC with minSigma = 0: U = mean, so any count above the constant baseline alarms.
    above, level = ears([2] * 7 + [3], "C1", min_sigma=0), ears([2] * 8, "C1", min_sigma=0)
    assert above.status == level.status == "undefined"
    assert above.value is None and above.upper_bound == 2
    assert (above.alarm, level.alarm) == (True, False)
    assert ears([0] * 11 + [1], "C3", min_sigma=0).alarm


@pytest.mark.parametrize("method, needed", [("C1", 7), ("C2", 9), ("C3", 11)])
def test_it_needs_the_published_minimum_history(method, needed):  # R-EARSC: b+1, b+3, b+5
    series = [50] * (needed + 1)
    assert min_history(method) == needed
    early = ears(series, method, needed - 1)
    assert early.status == "insufficient_history" and not early.alarm and early.value is None
    assert ears(series, method, needed).status == "ok"


def test_default_thresholds_are_r_normal_quantiles():  # R-EARSC: alpha 0.001 and 0.025
    assert default_threshold("C1") == pytest.approx(3.0902, abs=1e-4)
    assert default_threshold("C3") == pytest.approx(1.9600, abs=1e-4)


def test_it_rejects_an_unknown_method_and_a_bad_index():
    with pytest.raises(ValueError):
        ears(B2, "C4")
    with pytest.raises(IndexError):
        ears(B2, "C1", 12)


counts = st.lists(st.integers(min_value=0, max_value=200), min_size=12, max_size=30)


@given(counts, st.sampled_from(["C1", "C2"]))
def test_c1_c2_alarm_exactly_when_the_count_passes_the_upper_bound(series, method):
    for result in ears_series(series, method):
        if result.status != "insufficient_history":
            assert result.alarm == (result.observed > result.upper_bound)
            assert result.upper_bound >= result.baseline_mean


@given(counts, st.sampled_from(["C1", "C2", "C3"]), st.integers(min_value=1, max_value=1000))
def test_adding_a_constant_to_every_week_changes_no_statistic(series, method, shift):
    before = ears(series, method)
    after = ears([c + shift for c in series], method)
    assert after.value == pytest.approx(before.value, abs=1e-6)
    if abs(before.value - before.threshold) > 1e-6:  # rounding may tip an exact tie
        assert after.alarm == before.alarm


@given(counts, st.sampled_from(["C1", "C2", "C3"]), st.integers(min_value=1, max_value=50))
def test_a_higher_count_this_week_never_silences_an_alarm(series, method, extra):
    if ears(series, method).alarm:
        assert ears(series[:-1] + [series[-1] + extra], method).alarm


@given(counts)
def test_c3_is_the_sum_of_the_c2_excess_over_three_weeks(series):
    c2 = [ears(series, "C2", t) for t in range(len(series) - 3, len(series))]
    assume(all(r.value is not None for r in c2))
    expected = sum(max(0.0, r.value - 1) for r in c2)
    assert ears(series, "C3").value == pytest.approx(expected, abs=1e-9)
