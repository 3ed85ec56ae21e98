"""Published dehydration scores (clinic_app.clinical.scores): clinical-facts.md §9.

Sources: CDS items S23 (BMC Pediatr 2014 Table 1), bands S22/S23, ages S21/S22 and C16;
Gorelick items S24; Gorelick cut-offs and population from memory (§9.2); DHAKA items S25,
DHAKA point weights and bands from memory (§9.3).
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from clinic_app.clinical import scores
from clinic_app.clinical.rulebook import RULES

CDS_NORMAL = {"general_appearance": "normal", "eyes": "normal", "mucous_membranes": "moist",
              "tears": "tears"}
GORELICK_NORMAL = {name: next(iter(findings)) for name, findings in scores.item_points("gorelick").items()}
DHAKA_NORMAL = {"general_appearance": "normal", "respirations": "normal", "skin_pinch": "normal",
                "tears": "normal"}


def _scores(age_months=24, **scales):
    return scores.compute_scores({"score_items": scales}, age_months)


# --- Item points ---

@pytest.mark.parametrize(
    ("item", "finding", "points"),
    [
        pytest.param("general_appearance", "normal", 0, id="S23-CDS-appearance-normal-0"),
        pytest.param("general_appearance", "thirsty_restless_or_lethargic_but_irritable", 1,
                     id="S23-CDS-appearance-thirsty-restless-1"),
        pytest.param("general_appearance", "drowsy_limp_cold_sweaty_or_comatose", 2,
                     id="S23-CDS-appearance-drowsy-limp-2"),
        pytest.param("eyes", "slightly_sunken", 1, id="S23-CDS-eyes-slightly-sunken-1"),
        pytest.param("eyes", "very_sunken", 2, id="S23-CDS-eyes-very-sunken-2"),
        pytest.param("mucous_membranes", "sticky", 1, id="S23-CDS-tongue-sticky-1"),
        pytest.param("mucous_membranes", "dry", 2, id="S23-CDS-tongue-dry-2"),
        pytest.param("tears", "decreased", 1, id="S23-CDS-tears-decreased-1"),
        pytest.param("tears", "absent", 2, id="S23-CDS-tears-absent-2"),
    ],
)
def test_each_cds_finding_scores_its_published_points(item, finding, points):
    result = _scores(cds={**CDS_NORMAL, item: finding})["cds"]
    assert result["score"] == points


@pytest.mark.parametrize("item", list(GORELICK_NORMAL), ids=lambda item: f"S24-Gorelick-{item}-1")
def test_each_abnormal_gorelick_sign_scores_one_point(item):
    abnormal = list(scores.item_points("gorelick")[item])[1]
    result = _scores(gorelick={**GORELICK_NORMAL, item: abnormal})
    assert result["gorelick_10"]["score"] == 1
    in_four = item in RULES["score_gorelick"]["four_item_names"]["value"]
    assert result["gorelick_4"]["score"] == (1 if in_four else 0)


def test_the_four_item_gorelick_uses_appearance_refill_tears_and_mucosa():
    # S24 handout: "general appearance, capillary refill >2 seconds, absence of tears, and dry
    # mucous membranes".
    assert RULES["score_gorelick"]["four_item_names"]["value"] == [
        "general_appearance", "capillary_refill", "tears", "mucous_membranes"]


@pytest.mark.parametrize(
    ("item", "finding", "points"),
    [
        pytest.param("general_appearance", "restless_or_irritable", 2, id="S25-from-memory-DHAKA-restless-2"),
        pytest.param("general_appearance", "lethargic_or_unconscious", 4, id="S25-from-memory-DHAKA-lethargic-4"),
        pytest.param("respirations", "deep", 2, id="S25-from-memory-DHAKA-deep-breathing-2"),
        pytest.param("skin_pinch", "slow", 2, id="S25-from-memory-DHAKA-pinch-slow-2"),
        pytest.param("skin_pinch", "very_slow", 4, id="S25-from-memory-DHAKA-pinch-very-slow-4"),
        pytest.param("tears", "decreased", 1, id="S25-from-memory-DHAKA-tears-decreased-1"),
        pytest.param("tears", "absent", 2, id="S25-from-memory-DHAKA-tears-absent-2"),
    ],
)
def test_each_dhaka_finding_scores_its_remembered_points(item, finding, points):
    assert _scores(dhaka={**DHAKA_NORMAL, item: finding})["dhaka"]["score"] == points


# --- Bands ---

@pytest.mark.parametrize(
    ("findings", "score", "band"),
    [
        pytest.param({}, 0, "no_dehydration", id="S22-CDS-0-none"),
        pytest.param({"eyes": "slightly_sunken"}, 1, "some_dehydration", id="S22-CDS-1-some"),
        pytest.param({"eyes": "very_sunken", "tears": "absent"}, 4, "some_dehydration", id="S22-CDS-4-some"),
        pytest.param({"eyes": "very_sunken", "tears": "absent", "mucous_membranes": "sticky"}, 5,
                     "moderate_severe_dehydration", id="S22-CDS-5-moderate-severe"),
        pytest.param({"eyes": "very_sunken", "tears": "absent", "mucous_membranes": "dry",
                      "general_appearance": "drowsy_limp_cold_sweaty_or_comatose"}, 8,
                     "moderate_severe_dehydration", id="S22-CDS-8-moderate-severe"),
    ],
)
def test_the_cds_total_falls_in_its_published_band(findings, score, band):
    result = _scores(cds={**CDS_NORMAL, **findings})["cds"]
    assert (result["score"], result["band"], result["max_score"]) == (score, band, 8)
    assert result["status"] == "confirmed" and result["caution"] is None


def _gorelick_with(abnormal_count: int) -> dict:
    names = list(GORELICK_NORMAL)
    return {name: list(scores.item_points("gorelick")[name])[1 if i < abnormal_count else 0]
            for i, name in enumerate(names)}


@pytest.mark.parametrize(
    ("abnormal", "band_10", "band_4"),
    [
        pytest.param(0, "dehydration_under_5_percent", "dehydration_under_5_percent", id="S24-from-memory-0"),
        pytest.param(1, "dehydration_under_5_percent", "dehydration_under_5_percent", id="S24-from-memory-4item-1"),
        pytest.param(2, "dehydration_under_5_percent", "dehydration_5_percent_or_more", id="S24-from-memory-4item-2"),
        pytest.param(3, "dehydration_5_percent_or_more", "dehydration_5_percent_or_more", id="S24-from-memory-10item-3"),
        pytest.param(6, "dehydration_5_percent_or_more", "dehydration_5_percent_or_more", id="S24-from-memory-10item-6"),
        pytest.param(7, "dehydration_10_percent_or_more", "dehydration_5_percent_or_more", id="S24-from-memory-10item-7"),
        pytest.param(10, "dehydration_10_percent_or_more", "dehydration_5_percent_or_more", id="S24-from-memory-10item-10"),
    ],
)
def test_the_gorelick_totals_fall_in_their_remembered_bands(abnormal, band_10, band_4):
    result = _scores(gorelick=_gorelick_with(abnormal))
    assert result["gorelick_10"]["score"] == abnormal
    assert (result["gorelick_10"]["band"], result["gorelick_4"]["band"]) == (band_10, band_4)


@pytest.mark.parametrize(
    ("findings", "score", "band"),
    [
        pytest.param({"tears": "decreased"}, 1, "no_dehydration", id="S25-from-memory-DHAKA-1-none"),
        pytest.param({"tears": "absent"}, 2, "some_dehydration", id="S25-from-memory-DHAKA-2-some"),
        pytest.param({"tears": "decreased", "skin_pinch": "slow"}, 3, "some_dehydration",
                     id="S25-from-memory-DHAKA-3-some"),
        pytest.param({"skin_pinch": "very_slow"}, 4, "severe_dehydration", id="S25-from-memory-DHAKA-4-severe"),
        pytest.param({"general_appearance": "lethargic_or_unconscious", "respirations": "deep",
                      "skin_pinch": "very_slow", "tears": "absent"}, 12, "severe_dehydration",
                     id="S25-from-memory-DHAKA-12-severe"),
    ],
)
def test_the_dhaka_total_falls_in_its_remembered_band(findings, score, band):
    result = _scores(dhaka={**DHAKA_NORMAL, **findings})["dhaka"]
    assert (result["score"], result["band"]) == (score, band)


@pytest.mark.parametrize("rule_key", ["score_cds", "score_gorelick", "score_dhaka"])
def test_every_possible_total_has_exactly_one_band(rule_key):
    rule = RULES[rule_key]
    points = rule["items"]["points"]
    for bands_key in [k for k in rule if k.startswith("bands")]:
        names = rule["four_item_names"]["value"] if bands_key == "bands_4" else list(points)
        top = sum(max(points[name].values()) for name in names)
        covered = [s for row in rule[bands_key]["rows"] for s in range(row["min"], row["max"] + 1)]
        assert covered == list(range(top + 1))


# --- Which scores are computed, warnings and unconfirmed numbers ---

def test_it_computes_nothing_without_score_items():
    assert scores.compute_scores({}, 24) == {}
    assert scores.compute_scores({"score_items": {}}, 24) == {}


def test_it_skips_a_scale_with_a_missing_item():
    partial = {k: v for k, v in CDS_NORMAL.items() if k != "tears"}
    assert "cds" not in _scores(cds=partial)
    assert "cds" not in _scores(cds={**CDS_NORMAL, "tears": None})


def test_four_gorelick_items_give_only_the_four_item_score():
    four = {name: GORELICK_NORMAL[name] for name in RULES["score_gorelick"]["four_item_names"]["value"]}
    result = _scores(gorelick=four)
    assert set(result) == {"gorelick_4"}
    assert result["gorelick_4"]["max_score"] == 4


@pytest.mark.parametrize(
    ("scale", "items", "months", "warned"),
    [
        pytest.param("cds", CDS_NORMAL, 0.9, True, id="C16-CDS-under-1-month"),
        pytest.param("cds", CDS_NORMAL, 1, False, id="C16-CDS-1-month"),
        pytest.param("cds", CDS_NORMAL, 59.9, False, id="C16-CDS-59-months"),
        pytest.param("cds", CDS_NORMAL, 60, True, id="C16-CDS-60-months"),
        pytest.param("gorelick_10", GORELICK_NORMAL, 0.5, True, id="S24-from-memory-Gorelick-under-1-month"),
        pytest.param("gorelick_10", GORELICK_NORMAL, 30, False, id="S24-from-memory-Gorelick-30-months"),
        pytest.param("gorelick_10", GORELICK_NORMAL, 60, True, id="S24-from-memory-Gorelick-5-years"),
        pytest.param("dhaka", DHAKA_NORMAL, 0, False, id="S25-DHAKA-newborn"),
        pytest.param("dhaka", DHAKA_NORMAL, 59.9, False, id="S25-DHAKA-under-60-months"),
        pytest.param("dhaka", DHAKA_NORMAL, 60, True, id="S25-DHAKA-60-months"),
    ],
)
def test_it_warns_outside_the_validated_ages(scale, items, months, warned):
    input_scale = "gorelick" if scale.startswith("gorelick") else scale
    result = _scores(months, **{input_scale: items})[scale]
    assert (result["warning"] is not None) is warned
    if warned:
        assert "validated" in result["warning"]


def test_it_flags_the_numbers_taken_from_memory():
    result = _scores(dhaka=DHAKA_NORMAL, gorelick=GORELICK_NORMAL)
    assert result["dhaka"]["status"] == "unconfirmed"
    assert result["dhaka"]["unconfirmed"] == ["points", "bands"]
    assert "DHAKA" in result["dhaka"]["caution"]
    assert result["gorelick_10"]["unconfirmed"] == ["bands", "age_range"]
    for key in ("score_gorelick", "score_dhaka"):
        assert any(entry.get("status") == "unconfirmed" for entry in RULES[key].values()
                   if isinstance(entry, dict))


def test_it_names_the_source_of_each_score():
    result = _scores(cds=CDS_NORMAL, gorelick=GORELICK_NORMAL, dhaka=DHAKA_NORMAL)
    assert {key: value["source"] for key, value in result.items()} == {
        "cds": "S23", "gorelick_10": "S24", "gorelick_4": "S24", "dhaka": "S25"}


@pytest.mark.parametrize(
    ("score_items", "field"),
    [
        pytest.param({"cds": {**CDS_NORMAL, "eyes": "closed"}}, "score_items.cds.eyes", id="bad-finding"),
        pytest.param({"cds": {**CDS_NORMAL, "colour": "pale"}}, "score_items.cds.colour", id="unknown-item"),
        pytest.param({"nice": {}}, "score_items.nice", id="unknown-scale"),
        pytest.param({"dhaka": "bad"}, "score_items.dhaka", id="scale-not-object"),
    ],
)
def test_it_names_the_bad_score_field(score_items, field):
    inputs = {"score_items": score_items}
    errors = scores.score_item_errors(inputs)
    assert list(errors) == [field]
    assert errors[field].endswith(".")
    with pytest.raises(ValueError):
        scores.compute_scores(inputs, 24)


def test_score_items_must_be_an_object():
    assert list(scores.score_item_errors({"score_items": [1]})) == ["score_items"]


# --- Property: a worse finding never lowers a score or its band ---

def _band_rank(result_key: str, band: str) -> int:
    rule_key, _scale, _subset, bands_key = scores.SCALES[result_key]
    return [row["band"] for row in RULES[rule_key][bands_key]["rows"]].index(band)


@st.composite
def _findings_and_one_worse(draw):
    scale = draw(st.sampled_from(sorted(scores.INPUT_SCALES)))
    points = scores.item_points(scale)
    chosen = {name: draw(st.sampled_from(list(findings))) for name, findings in points.items()}
    item = draw(st.sampled_from(sorted(points)))
    worse = draw(st.sampled_from([f for f, p in points[item].items() if p >= points[item][chosen[item]]]))
    return scale, chosen, {**chosen, item: worse}


@given(case=_findings_and_one_worse(), months=st.floats(0, 70))
def test_a_worse_finding_never_lowers_a_score(case, months):
    scale, before, after = case
    first, second = _scores(months, **{scale: before}), _scores(months, **{scale: after})
    assert set(first) == set(second)
    for key in first:
        assert first[key]["score"] <= second[key]["score"]
        assert _band_rank(key, first[key]["band"]) <= _band_rank(key, second[key]["band"])


def test_the_api_docs_list_every_score_item_and_finding():
    from pathlib import Path

    docs = (Path(__file__).parents[2] / "docs" / "api.md").read_text(encoding="utf-8")
    section = docs.split("## Score items", 1)[1].split("\n## ", 1)[0]
    for scale in scores.INPUT_SCALES:
        for item, findings in scores.item_points(scale).items():
            assert f"`{item}`" in section
            for finding, points in findings.items():
                assert f"`{finding}` ({points})" in section
