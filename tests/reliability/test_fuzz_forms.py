"""Malformed and oversized input to every HTML form route: never a 5xx, never a traceback.

The routes come from the URL map (every POST outside /api/), each sent as a role its access
rule allows, with a valid CSRF header so the junk reaches the form code itself. The fields are
the ones the page's own GET shows, plus unknown ones, filled with fixed nasty values and with
hypothesis-generated text.
"""

from __future__ import annotations

import re
import uuid

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from clinic_app import create_app
from tests.conftest import TEST_CONFIG, login
from tests.web.access_rules import RULES
from tests.web.test_access_matrix import roles_for, sample_url

EXAMPLES_PER_ROUTE = 40
JUNK = ["", " ", "-1", "0", "1e309", "NaN", "-inf", "9" * 400, "0x1F", "1,5", "12.5.3",
        "\x00", "\ud7ff\ue000", "<script>alert(1)</script>", "' OR 1=1 --", "../../etc/passwd",
        "%s%s%n", "null", "true", "[]", "{}", "2026-13-45", "2026-W99", "é" * 300,
        "x" * 100_000]
_FIELD = re.compile(r'<(?:input|select|textarea)[^>]*\sname="([^"]+)"', re.I)


def _form_routes() -> list[tuple[str, str]]:
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        app = create_app({**TEST_CONFIG, "DATABASE": f"{tmp}/routes.sqlite3"})
        return sorted((rule.endpoint, rule.rule) for rule in app.url_map.iter_rules()
                      if "POST" in rule.methods and not rule.rule.startswith("/api/"))


def _case_for(app, client, csrf) -> str:
    """A stored case of the logged-in user, so case forms run past their 404."""
    from clinic_app.clinical.assess import assess
    from clinic_app.clinical.types import ClinicSettings

    token = client.post("/api/v1/devices", json={}, headers={"X-CSRFToken": csrf}
                        ).get_json()["token"]
    inputs = {"age_months": 14, "weight_kg": 9,
              "signs": {"condition": "restless", "eyes": "sunken", "drinking": "eager",
                        "skin_pinch": "slow"}}
    case = {"id": str(uuid.uuid4()), "created_at": "2026-12-01T08:00:00Z", "area": "Mbeza",
            "input": inputs, "result": assess(inputs, ClinicSettings()),
            "given": {"ors_sachets": 1, "zinc_tablets": 10}, "referral_made": False,
            "caregiver_language": "en"}
    response = app.test_client().post("/api/v1/cases", json={"cases": [case]},
                                      headers={"Authorization": f"Bearer {token}",
                                               "X-Clinic-Sync": "1"})
    assert response.status_code == 200
    return case["id"]


def _check(response, what: str) -> None:
    body = response.get_data().decode("utf-8", "replace")  # PDFs and images too
    assert response.status_code < 500, f"{what}: {response.status_code}"
    assert "Traceback" not in body and 'File "' not in body, what


@pytest.mark.parametrize("endpoint,rule", _form_routes())
def test_a_form_route_survives_junk_and_oversized_fields(app, users, endpoint, rule):
    role = roles_for(RULES[endpoint], "POST")[0] if endpoint in RULES else "admin"
    client = app.test_client()
    csrf = login(client, role)
    url = sample_url(rule)
    if "<case_id>" in rule:
        url = sample_url(rule.replace("<case_id>", _case_for(app, client, csrf)))
    headers = {"X-CSRFToken": csrf}
    has_get = any("GET" in r.methods for r in app.url_map.iter_rules(endpoint))
    page = client.get(url) if has_get else None
    fields = sorted(set(_FIELD.findall(page.get_data(as_text=True)))) if page else []
    fields = [f for f in fields if f != "csrf_token"] or ["value"]

    for junk in JUNK:
        _check(client.post(url, data={f: junk for f in fields}, headers=headers),
               f"{endpoint} with every field {junk[:20]!r}")
    _check(client.post(url, data={f: ["1", "2", "x"] for f in fields}, headers=headers),
           f"{endpoint} with repeated fields")
    _check(client.post(url, data={"unknown_field": "1"}, headers=headers),
           f"{endpoint} with no known field")
    _check(client.post(url, data="%%%=&&==%zz", headers={**headers, "Content-Type":
                                                          "application/x-www-form-urlencoded"}),
           f"{endpoint} with a broken urlencoded body")
    _check(client.post(url, data=b"\xff\xfe" * 1000, headers={**headers, "Content-Type":
                                                                "multipart/form-data"}),
           f"{endpoint} with a broken multipart body")
    too_big = client.post(url, data={fields[0]: "x" * (9 * 1024 * 1024)}, headers=headers)
    _check(too_big, f"{endpoint} with a 9 MB field")
    assert too_big.status_code == 413

    @settings(max_examples=EXAMPLES_PER_ROUTE, deadline=None, database=None,
              suppress_health_check=list(HealthCheck))
    @given(data=st.dictionaries(st.sampled_from([*fields, "next", "lang", "x"]),
                                st.one_of(st.text(max_size=300), st.sampled_from(JUNK[:-1])),
                                max_size=len(fields) + 3))
    def send(data):
        _check(client.post(url, data=data, headers=headers), f"{endpoint} with {data!r:.200}")

    send()


QUERY_NAMES = ["from", "to", "area", "worker", "age_group", "sex", "lang", "size", "next",
               "page", "week", "q", "kind"]


def _get_routes() -> list[tuple[str, str]]:
    import tempfile

    with tempfile.TemporaryDirectory() as tmp:
        app = create_app({**TEST_CONFIG, "DATABASE": f"{tmp}/routes.sqlite3"})
        return sorted((rule.endpoint, rule.rule) for rule in app.url_map.iter_rules()
                      if "GET" in rule.methods and not rule.rule.startswith("/api/")
                      and rule.endpoint != "static")


@pytest.mark.parametrize("endpoint,rule", _get_routes())
def test_a_page_survives_junk_query_parameters(app, users, endpoint, rule):
    role = roles_for(RULES[endpoint], "GET")[0] if endpoint in RULES else "admin"
    client = app.test_client()
    csrf = login(client, role)
    url = sample_url(rule)
    if "<case_id>" in rule:
        url = sample_url(rule.replace("<case_id>", _case_for(app, client, csrf)))
    for junk in JUNK[:-1]:
        _check(client.get(url, query_string={name: junk for name in QUERY_NAMES}),
               f"{endpoint} with every parameter {junk[:20]!r}")
    _check(client.get(url, query_string={name: ["1", "x"] for name in QUERY_NAMES}),
           f"{endpoint} with repeated parameters")
    _check(client.get(url + "?from=2026-W01&to=9999-W52&lang=xx&size=a0"),
           f"{endpoint} with a huge week range")
