"""The API's own OpenAPI 3.0 document at ``GET /api/v1/openapi.json`` (any logged-in role).

Every route under /api/v1 has one entry in OPERATIONS below, keyed by (OpenAPI path, method);
tests/reliability/test_openapi.py fails when a route has no entry, and the fuzz test
(tests/reliability/test_fuzz_api.py) sends thousands of generated requests built from it.
The assessment input schema is generated from the rulebook's own input field list, so the
document and the validator cannot drift apart.
"""

from __future__ import annotations

import re

from flask import current_app, jsonify

from clinic_app.web.api import bp

ERROR_REF = {"$ref": "#/components/schemas/Error"}
SESSION = [{"sessionCookie": []}]
SESSION_CSRF = [{"sessionCookie": [], "csrfHeader": []}]
DEVICE = [{"deviceToken": []}]


def _error(description: str) -> dict:
    return {"description": description, "content": {"application/json": {"schema": ERROR_REF}}}


def _json(schema: dict, description: str = "OK") -> dict:
    return {"description": description, "content": {"application/json": {"schema": schema}}}


def _body(schema: dict) -> dict:
    return {"required": True, "content": {"application/json": {"schema": schema}}}


def _ref(name: str) -> dict:
    return {"$ref": f"#/components/schemas/{name}"}


def _nullable(schema: dict) -> dict:
    return {**schema, "nullable": True}


# Errors every logged-in route can answer with.
COMMON_ERRORS = {"400": _error("The body is not JSON, or the form token is missing."),
                 "401": _error("Not logged in.")}
CODE = {"type": "object", "required": ["code", "text"],
        "properties": {"code": {"type": "string"}, "text": {"type": "string"}}}

SCHEMAS: dict[str, dict] = {
    "Error": {
        "type": "object", "required": ["error"], "additionalProperties": False,
        "properties": {"error": {
            "type": "object", "required": ["code", "message", "fields"],
            "additionalProperties": False,
            "properties": {"code": {"type": "string"}, "message": {"type": "string"},
                           "fields": {"type": "object",
                                      "additionalProperties": {"type": "string"}}}}},
    },
    "User": {
        "type": "object", "required": ["username", "role"],
        "properties": {"username": {"type": "string"},
                       "role": {"type": "string", "enum": ["chw", "nurse", "supervisor",
                                                          "admin"]},
                       "display_name": {"type": "string"}, "area": {"type": "string"}},
    },
    "Login": {
        "type": "object", "required": ["username", "password"],
        "properties": {"username": {"type": "string", "maxLength": 64},
                       "password": {"type": "string", "maxLength": 256}},
    },
    "LoggedIn": {
        "type": "object", "required": ["user", "csrf_token"],
        "properties": {"user": _ref("User"), "csrf_token": {"type": "string"}},
    },
    "AssessResult": {
        "type": "object",
        "required": ["severity", "plan", "refer", "classifications", "ors", "per_stool_ml",
                     "home_ors_ml_per_day", "zinc", "iv", "ng", "sam_rehydration", "actions",
                     "cautions", "scores", "rulebook_version"],
        "properties": {
            "severity": {"type": "string", "enum": ["none", "some", "severe"]},
            "plan": {"type": "string", "enum": ["A", "B", "C", "SAM"]},
            "refer": {"type": "string", "enum": ["urgent", "routine", "none"]},
            "classifications": {"type": "array", "items": {"type": "string", "enum": [
                "no_dehydration", "some_dehydration", "severe_dehydration",
                "very_severe_disease", "dysentery", "persistent_diarrhoea",
                "severe_persistent_diarrhoea", "severe_acute_malnutrition",
                "moderate_acute_malnutrition", "suspected_cholera", "young_infant"]}},
            "ors": _nullable({"type": "object", "required": ["total_ml", "low_ml", "high_ml",
                                                             "hours", "basis", "hourly_ml"],
                              "properties": {
                                  "total_ml": _nullable({"type": "number"}),
                                  "low_ml": _nullable({"type": "number"}),
                                  "high_ml": _nullable({"type": "number"}),
                                  "hours": {"type": "number"},
                                  "basis": {"type": "string", "enum": ["weight", "age"]},
                                  "hourly_ml": {"type": "array"}}}),
            "per_stool_ml": _nullable({"type": "object"}),
            "home_ors_ml_per_day": _nullable({"type": "number"}),
            "zinc": _nullable({"type": "object", "required": ["mg_per_day", "days_min",
                                                              "days_max"]}),
            "iv": _nullable({"type": "object", "required": ["fluid", "steps"]}),
            "ng": _nullable({"type": "object"}),
            "sam_rehydration": _nullable({"type": "object"}),
            "actions": {"type": "array", "items": CODE},
            "cautions": {"type": "array", "items": CODE},
            "scores": {"type": "object"},
            "rulebook_version": {"type": "string"},
        },
    },
    "Rulebook": {
        "type": "object", "required": ["version", "rules", "settings"],
        "properties": {"version": {"type": "string"}, "rules": {"type": "object"},
                       "settings": {"type": "object"}, "sources": {},
                       "growth_tables": {}},
    },
    "Device": {
        "type": "object", "required": ["device_id", "token"],
        "properties": {"device_id": {"type": "string"}, "token": {"type": "string"}},
    },
    "SyncCase": {
        "type": "object", "required": ["id", "created_at", "input", "result"],
        "properties": {
            "id": {"type": "string", "format": "uuid"},
            "created_at": {"type": "string", "format": "date-time"},
            "area": {"type": "string", "maxLength": 100},
            "input": _ref("AssessInput"),
            "result": {"type": "object"},
            "given": {"type": "object", "properties": {
                "ors_sachets": {"type": "integer", "minimum": 0, "maximum": 1000},
                "zinc_tablets": {"type": "integer", "minimum": 0, "maximum": 1000}}},
            "referral_made": {"type": "boolean"},
            "caregiver_language": {"type": "string", "maxLength": 35},
            "household_ref": _nullable({"type": "string", "maxLength": 64}),
            "note": _nullable({"type": "string", "maxLength": 2000}),
        },
    },
    "SyncResults": {
        "type": "object", "required": ["results"],
        "properties": {"results": {"type": "array", "items": {
            "type": "object", "required": ["id", "status", "error"],
            "properties": {"id": {},
                           "status": {"type": "string",
                                      "enum": ["created", "duplicate", "conflict", "rejected"]},
                           "error": _nullable({"type": "string"})}}}},
    },
    "StoredCase": {
        "type": "object",
        "required": ["id", "created_at", "received_at", "input", "result", "server_result",
                     "engine_mismatch", "rulebook_version", "given", "status"],
        "properties": {"id": {"type": "string"}, "created_at": {"type": "string"},
                       "received_at": {"type": "string"}, "input": {"type": "object"},
                       "result": {"type": "object"}, "server_result": {"type": "object"},
                       "engine_mismatch": {"type": "boolean"},
                       "rulebook_version": {"type": "string"}, "given": {"type": "object"},
                       "referral_made": {"type": "boolean"}, "status": {"type": "string"}},
    },
    "Tallies": {
        "type": "object", "required": ["weeks"],
        "properties": {"weeks": {"type": "array", "items": {
            "type": "object", "required": ["week", "cases", "by_severity", "by_plan"],
            "properties": {"week": {"type": "string", "pattern": r"^\d{4}-W\d\d$"},
                           "cases": {"type": "integer"},
                           "by_severity": {"type": "object"}, "by_plan": {"type": "object"},
                           "referrals_urgent": {"type": "integer"},
                           "suspected_cholera": {"type": "integer"},
                           "deaths": {"type": "integer"},
                           "ors_sachets": {"type": "integer"},
                           "zinc_tablets": {"type": "integer"}}}}},
    },
}

_TIME = {"type": "string", "format": "date-time"}
_RECORD = {"id": {"type": "string", "format": "uuid"}, "case_id": {"type": "string"}}
SCHEMAS.update({
    "Reassessment": {"type": "object", "required": ["id", "case_id", "assessed_at", "input"],
                     "properties": {**_RECORD, "assessed_at": _TIME,
                                    "input": _ref("AssessInput"), "result": {"type": "object"}}},
    "MonitoringEntry": {
        "type": "object", "required": ["id", "case_id", "at", "what"],
        "properties": {**_RECORD, "at": _TIME,
                       "kind": {"type": "string", "enum": ["intake", "output", "check"]},
                       "what": {"type": "string", "enum": ["ors", "other", "stool", "vomit",
                                                          "urine", "check"]},
                       "ml": _nullable({"type": "number", "minimum": 0, "maximum": 5000}),
                       "cups": _nullable({"type": "number", "minimum": 0, "maximum": 20}),
                       "puffy_eyelids": {"type": "boolean"},
                       "not_improving": {"type": "boolean"}}},
    "Outcome": {
        "type": "object", "required": ["id", "case_id", "at", "outcome"],
        "properties": {**_RECORD, "at": _TIME,
                       "outcome": {"type": "string", "enum": [
                           "recovered_home", "referred", "admitted", "died",
                           "lost_to_follow_up"]},
                       "referred_to": _nullable({"type": "string", "maxLength": 200}),
                       "referred_at": _nullable(_TIME),
                       "transport": _nullable({"type": "string", "maxLength": 100}),
                       "followup_date": _nullable({"type": "string", "format": "date"}),
                       "improving": _nullable({"type": "boolean"})}},
})
SYNC_HEADER = [{"name": "X-Clinic-Sync", "in": "header", "required": True,
                "schema": {"type": "string", "enum": ["1"]}}]
SYNC_ERRORS = {"400": _error("The body is not a JSON object with the batch list."),
               "401": _error("No sync token, or an unknown or revoked one."),
               "403": _error("Sync header, JSON content type or origin missing."),
               "413": _error("More than 500 records in one batch.")}


def _device_upload(name: str, field: str, item: str) -> dict:
    """A phone upload of follow-up records: same auth, batch and statuses as the cases."""
    results = {"type": "object", "required": ["results"], "properties": {"results": {
        "type": "array", "items": {"type": "object", "required": ["id", "status", "error"],
                                   "properties": {"id": {}, "status": {"type": "string", "enum": [
                                       "created", "duplicate", "conflict", "rejected",
                                       "retry"]}, "error": _nullable({"type": "string"})}}}}}
    return {"summary": f"Upload a batch of {name} made offline, exactly once per record id "
                       "(status retry: the case has not arrived yet).",
            "security": DEVICE, "parameters": SYNC_HEADER,
            "requestBody": _body({"type": "object", "required": [field], "properties": {
                field: {"type": "array", "maxItems": 500, "items": _ref(item)}}}),
            "responses": {"200": _json(results), **SYNC_ERRORS}}


# (OpenAPI path, method) -> operation. One entry per route under /api/v1.
OPERATIONS: dict[tuple[str, str], dict] = {
    ("/api/v1/ping", "get"): {
        "summary": "Health check the phones use before syncing (public).", "security": [],
        "responses": {"200": _json({"type": "object", "required": ["ok", "time"],
                                    "properties": {"ok": {"type": "boolean"},
                                                   "time": {"type": "string"}}})},
    },
    ("/api/v1/login", "post"): {
        "summary": "Log in; answers the user and the CSRF token for later JSON POSTs.",
        "security": [], "requestBody": _body(_ref("Login")),
        "responses": {"200": _json(_ref("LoggedIn")),
                      "400": _error("The body is not a JSON object."),
                      "401": _error("Wrong user name or password."),
                      "422": _error("User name or password missing."),
                      "429": _error("Too many failed attempts.")},
    },
    ("/api/v1/logout", "post"): {
        "summary": "End the server-side session.", "security": SESSION_CSRF,
        "responses": {"200": _json({"type": "object", "properties": {
            "ok": {"type": "boolean"}}}), **COMMON_ERRORS},
    },
    ("/api/v1/me", "get"): {
        "summary": "The logged-in user and a fresh CSRF token.", "security": SESSION,
        "responses": {"200": _json(_ref("LoggedIn")), "401": COMMON_ERRORS["401"]},
    },
    ("/api/v1/openapi.json", "get"): {
        "summary": "This document.", "security": SESSION,
        "responses": {"200": _json({"type": "object", "required": ["openapi", "paths"]}),
                      "401": COMMON_ERRORS["401"]},
    },
    ("/api/v1/assess", "post"): {
        "summary": "Assess one child (stores nothing). Any logged-in role.",
        "security": SESSION_CSRF, "requestBody": _body(_ref("AssessInput")),
        "responses": {"200": _json(_ref("AssessResult")), **COMMON_ERRORS,
                      "422": _error("invalid_input (one message per bad field) or "
                                    "implausible_weight.")},
    },
    ("/api/v1/rulebook", "get"): {
        "summary": "The rulebook and clinic settings the offline engine applies.",
        "security": SESSION,
        "responses": {"200": _json(_ref("Rulebook")), "401": COMMON_ERRORS["401"]},
    },
    ("/api/v1/devices", "post"): {
        "summary": "Register a phone for sync; the token is shown once.",
        "security": SESSION_CSRF,
        "requestBody": {"required": False, "content": {"application/json": {"schema": {
            "type": "object", "properties": {"label": {"type": "string", "maxLength": 100}}}}}},
        "responses": {"201": _json(_ref("Device"), "Registered"), **COMMON_ERRORS},
    },
    ("/api/v1/cases", "post"): {
        "summary": "Upload a batch of cases made offline, exactly once per case id.",
        "security": DEVICE,
        "parameters": SYNC_HEADER,
        "requestBody": _body({"type": "object", "required": ["cases"], "properties": {
            "cases": {"type": "array", "maxItems": 500, "items": _ref("SyncCase")}}}),
        "responses": {"200": _json(_ref("SyncResults")), **SYNC_ERRORS},
    },
    **{(f"/api/v1/{name}", "post"): _device_upload(name, field, item)
       for name, field, item in (("reassessments", "reassessments", "Reassessment"),
                                 ("monitoring", "entries", "MonitoringEntry"),
                                 ("outcomes", "outcomes", "Outcome"))},
    ("/api/v1/due", "get"): {
        "summary": "What is due now in the user's scope: bedside checks and visits.",
        "security": SESSION,
        "responses": {"200": _json({"type": "object", "required": ["now", "items", "visits"],
                                    "properties": {"now": {"type": "string"},
                                                   "items": {"type": "array"},
                                                   "visits": {"type": "array"}}}),
                      "401": COMMON_ERRORS["401"]},
    },
    ("/api/v1/cases/{case_id}", "get"): {
        "summary": "One stored case, to the roles that may see it (a CHW: their own).",
        "security": SESSION,
        "parameters": [{"name": "case_id", "in": "path", "required": True,
                        "schema": {"type": "string"}}],
        "responses": {"200": _json(_ref("StoredCase")), "401": COMMON_ERRORS["401"],
                      "404": _error("No such case, or not one this user may see.")},
    },
    ("/api/v1/tallies", "get"): {
        "summary": "Weekly tallies by ISO week of created_at (supervisor and admin).",
        "security": SESSION,
        "parameters": [
            {"name": "from", "in": "query", "required": True,
             "schema": {"type": "string", "pattern": r"^\d{4}-W\d\d$"}},
            {"name": "to", "in": "query", "required": True,
             "schema": {"type": "string", "pattern": r"^\d{4}-W\d\d$"}},
            {"name": "area", "in": "query", "schema": {"type": "string"}},
            {"name": "worker", "in": "query", "schema": {"type": "string",
                                                         "pattern": r"^\d+$"}},
            {"name": "age_group", "in": "query", "schema": {"type": "string"}},
            {"name": "sex", "in": "query", "schema": {"type": "string"}}],
        "responses": {"200": _json(_ref("Tallies")),
                      "400": _error("Bad or reversed week range (at most 261 weeks), or a bad "
                                    "filter."),
                      "401": COMMON_ERRORS["401"], "403": _error("Not for this role.")},
    },
}


def _field_schema(spec: dict) -> dict:
    """The JSON schema of one rulebook input field (validate.py is the interpreter)."""
    kind = spec["type"]
    if kind == "object":
        return {"type": "object", "additionalProperties": False,
                "required": [f["name"] for f in spec["fields"] if f.get("required")],
                "properties": {f["name"]: _field_schema(f) for f in spec["fields"]}}
    if kind == "choice":
        schema: dict = {"type": "string", "enum": list(spec["choices"])}
    else:
        schema = {"type": kind}
        if spec.get("min") is not None:
            schema["minimum"] = spec["min"]
        if spec.get("max") is not None:
            schema["maximum"] = spec["max"]
        if spec.get("max_exclusive") is not None:
            schema["maximum"] = spec["max_exclusive"]
            schema["exclusiveMaximum"] = True
    return {**schema, "nullable": not spec.get("required", False)}


def assess_input_schema() -> dict:
    """The assessment input schema, generated from RULES["input_fields"] and the score items."""
    from clinic_app.clinical import scores
    from clinic_app.clinical.rulebook import RULES

    schema = _field_schema({"type": "object", "fields": RULES["input_fields"]["fields"]})
    schema["properties"]["score_items"] = {
        "type": "object", "additionalProperties": False,
        "properties": {scale: {"type": "object", "additionalProperties": False,
                               "properties": {item: {"type": "string", "enum": list(findings)}
                                              for item, findings in
                                              scores.item_points(scale).items()}}
                       for scale in scores.INPUT_SCALES}}
    return schema


def openapi_path(rule: str) -> str:
    """A Flask rule as an OpenAPI path: ``/cases/<case_id>`` -> ``/cases/{case_id}``."""
    return re.sub(r"<(?:[^:<>]+:)?([^<>]+)>", r"{\1}", rule)


def document() -> dict:
    """The whole OpenAPI document."""
    # Only the routes this app serves (an operation may be written before its route lands).
    served = {(openapi_path(rule.rule), method.lower())
              for rule in current_app.url_map.iter_rules() for method in rule.methods}
    paths: dict[str, dict] = {}
    for (path, method), operation in OPERATIONS.items():
        if (path, method) in served:
            paths.setdefault(path, {})[method] = operation
    return {
        "openapi": "3.0.3",
        "info": {"title": "Rehydration Desk API", "version": "1",
                 "description": "Every error answers {\"error\": {\"code\", \"message\", "
                                "\"fields\"}}. JSON POSTs made with a session send the token "
                                "from /login or /me in X-CSRFToken."},
        "paths": paths,
        "components": {
            "schemas": {**SCHEMAS, "AssessInput": assess_input_schema()},
            "securitySchemes": {
                "sessionCookie": {"type": "apiKey", "in": "cookie", "name": "session"},
                "csrfHeader": {"type": "apiKey", "in": "header", "name": "X-CSRFToken"},
                "deviceToken": {"type": "http", "scheme": "bearer"},
            },
        },
    }


@bp.get("/openapi.json")
def openapi_document():
    return jsonify(document())
