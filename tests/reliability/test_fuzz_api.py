"""Generated bad input: Schemathesis and hypothesis send at least 5,000 requests built from the
app's own OpenAPI document, through the Flask app (WSGI), as a logged-in user with the CSRF
header and as a registered phone for the sync uploads.

Every answer must be below 500, every 4xx must carry the JSON error shape, and every answer
must match the status codes and schemas the document promises.
"""

from __future__ import annotations

import collections
import math
import time

import pytest
import schemathesis
from hypothesis import HealthCheck, Phase, given, settings
from hypothesis.errors import Unsatisfiable
from schemathesis import GenerationMode
from schemathesis.checks import not_a_server_error
from schemathesis.specs.openapi.checks import (
    response_schema_conformance,
    status_code_conformance,
)

from clinic_app.web.openapi import openapi_path
from tests.conftest import login
from tests.web.access_rules import RULES

TARGET_REQUESTS = 5000
# Batch uploads recompute every record (a full assessment per case): fewer examples for them
# keep the whole run within a few minutes on two cores.
WEIGHTS = {"/api/v1/cases": 1, "/api/v1/reassessments": 1, "/api/v1/monitoring": 1,
           "/api/v1/outcomes": 1}
DEFAULT_WEIGHT = 4
# The role each operation is sent as: the most widely scoped role its rule allows.
ROLE_PREFERENCE = ("nurse", "supervisor", "admin", "chw")
# Not schemathesis' negative_data_rejection: a sync upload answers 200 and rejects bad records
# one by one in its results, by design, and the fuzzer's own auth headers undo its negations.
CHECKS = [not_a_server_error, status_code_conformance, response_schema_conformance]


def error_shape_problem(response) -> str | None:
    """Why a 4xx answer does not carry {"error": {"code", "message", "fields"}}, or None."""
    try:
        body = response.json()
    except ValueError:
        return "not JSON"
    error = body.get("error") if isinstance(body, dict) else None
    if not isinstance(error, dict) or set(error) != {"code", "message", "fields"}:
        return f"not the error shape: {str(body)[:200]}"
    if not (isinstance(error["code"], str) and error["code"]
            and isinstance(error["message"], str) and error["message"]
            and isinstance(error["fields"], dict)):
        return f"empty or mistyped error members: {error}"
    if "Traceback" in response.text:
        return "a traceback in the answer"
    return None


class Caller:
    """Logged-in test clients per role, the phone's sync headers, and a request counter."""

    def __init__(self, app):
        self.app = app
        self.sessions: dict[str, tuple] = {}
        self.count = 0
        self.statuses: dict[str, dict[int, int]] = {}
        phone = app.test_client()
        csrf = login(phone, "chw")
        token = phone.post("/api/v1/devices", json={"label": "fuzz"},
                           headers={"X-CSRFToken": csrf}).get_json()["token"]
        self.device_headers = {"Authorization": f"Bearer {token}", "X-Clinic-Sync": "1"}

    def session(self, role: str, fresh: bool = False) -> tuple:
        if fresh or role not in self.sessions:
            client = self.app.test_client()
            csrf = login(client, role)
            if fresh:
                return client, csrf, client.get_cookie("session").value
            self.sessions[role] = (client, csrf, client.get_cookie("session").value)
        return self.sessions[role]

    def call(self, case, endpoint: str):
        rule = RULES[endpoint]
        if rule.csrf == "device":
            response = case.call(app=self.app, headers=self.device_headers)
        else:
            role = next(r for r in ROLE_PREFERENCE if r in rule.roles)
            # Logging out ends the session, so that operation gets a fresh one every time.
            client, csrf, cookie = self.session(role, fresh=endpoint.endswith(".logout"))
            response = case.call(app=self.app, session=client,
                                 headers={"X-CSRFToken": csrf}, cookies={"session": cookie})
        self.count += 1
        key = f"{case.method} {case.path}"
        self.statuses.setdefault(key, {}).setdefault(response.status_code, 0)
        self.statuses[key][response.status_code] += 1
        return response


def endpoint_of(app, operation) -> str:
    return next(rule.endpoint for rule in app.url_map.iter_rules()
                if openapi_path(rule.rule) == operation.path
                and operation.method.upper() in rule.methods)


def has_inputs(operation) -> bool:
    definition = operation.definition.raw
    return bool(definition.get("parameters") or definition.get("requestBody"))


def fuzz(caller, operation, mode, endpoint: str, max_examples: int) -> None:
    """Send up to ``max_examples`` generated requests for one operation in one mode."""

    @settings(max_examples=max_examples, deadline=None, database=None,
              phases=[Phase.explicit, Phase.generate, Phase.shrink],
              suppress_health_check=list(HealthCheck))
    @given(case=operation.as_strategy(generation_mode=mode))
    def send(case):
        response = caller.call(case, endpoint)
        case.validate_response(response, checks=CHECKS)
        if 400 <= response.status_code < 500:
            problem = error_shape_problem(response)
            assert problem is None, f"{case.method} {case.path}: {problem}"

    send()


@pytest.mark.slow
def test_thousands_of_generated_requests_get_no_server_error_and_clear_4xx(app, client, users):
    # Thousands of failed logins would lock out the fuzzer's own re-logins; throttling has its
    # own tests (tests/web/test_auth.py, tests/web/test_access_matrix.py).
    app.config.update(LOGIN_MAX_FAILURES_PER_ACCOUNT=10**9, LOGIN_MAX_FAILURES_PER_ADDRESS=10**9)
    login(client, "admin")
    schema = schemathesis.openapi.from_dict(client.get("/api/v1/openapi.json").get_json())
    operations = [result.ok() for result in schema.get_all_operations()]
    caller = Caller(app)
    # Two generation modes (valid and invalid input) per operation that takes input; 10 %
    # spare because hypothesis skips duplicate inputs. Operations without input: one request.
    weights = {op.path: WEIGHTS.get(op.path, DEFAULT_WEIGHT) for op in operations
               if has_inputs(op)}
    per_weight = math.ceil(TARGET_REQUESTS * 1.1 / (2 * sum(weights.values())))
    problems: list[str] = []
    seconds: dict[str, float] = collections.defaultdict(float)
    for operation in operations:
        key = f"{operation.method.upper()} {operation.path}"
        modes = [GenerationMode.POSITIVE]
        if has_inputs(operation):
            modes.append(GenerationMode.NEGATIVE)
        for mode in modes:
            started = time.monotonic()
            try:
                fuzz(caller, operation, mode, endpoint_of(app, operation),
                     per_weight * weights.get(operation.path, 0) or 1)
            except Unsatisfiable:
                problems.append(f"{key} {mode.value}: no input could be generated")
            seconds[key] += time.monotonic() - started
    print(f"\nfuzzed requests: {caller.count}")
    for key, counts in sorted(caller.statuses.items()):
        print(f"  {key}: {dict(sorted(counts.items()))} in {seconds[key]:.0f} s")
    assert problems == []
    assert caller.count >= TARGET_REQUESTS
    assert all(status < 500 for counts in caller.statuses.values() for status in counts)


@pytest.mark.parametrize("worker", ["9" * 40, "²", "١٢"])
def test_what_the_fuzzer_found_stays_fixed_tallies_worker_filter(client, users, worker):
    login(client, "supervisor")
    response = client.get("/api/v1/tallies", query_string={"from": "2026-W01", "to": "2026-W04",
                                                           "worker": worker})
    assert response.status_code == 400
    assert response.get_json()["error"]["fields"]["worker"]
