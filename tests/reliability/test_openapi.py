"""The app's own OpenAPI document describes every API route, and nothing it does not serve."""

from __future__ import annotations

from clinic_app.web.openapi import assess_input_schema, openapi_path
from tests.conftest import login


def served_api_operations(app) -> set[tuple[str, str]]:
    return {(openapi_path(rule.rule), method.lower())
            for rule in app.url_map.iter_rules() if rule.rule.startswith("/api/")
            for method in rule.methods - {"HEAD", "OPTIONS"}}


def documented_operations(document: dict) -> set[tuple[str, str]]:
    return {(path, method) for path, item in document["paths"].items() for method in item}


def test_the_document_needs_a_login_like_every_api_route_but_ping(client):
    response = client.get("/api/v1/openapi.json")
    assert response.status_code == 401
    assert response.get_json()["error"]["code"] == "login_required"


def test_every_api_route_of_the_url_map_is_in_the_document(app, client, users):
    login(client, "chw")
    document = client.get("/api/v1/openapi.json").get_json()
    missing = sorted(served_api_operations(app) - documented_operations(document))
    assert not missing, ("API routes missing from clinic_app/web/openapi.py OPERATIONS: "
                         + ", ".join(f"{m.upper()} {p}" for p, m in missing))
    assert documented_operations(document) <= served_api_operations(app)


def test_every_operation_documents_its_error_answers_with_the_error_shape(app, client, users):
    login(client, "nurse")
    document = client.get("/api/v1/openapi.json").get_json()
    for path, item in document["paths"].items():
        for method, operation in item.items():
            statuses = set(operation["responses"])
            assert any(s.startswith("2") for s in statuses), (method, path)
            for status, answer in operation["responses"].items():
                if status.startswith("4"):
                    schema = answer["content"]["application/json"]["schema"]
                    assert schema == {"$ref": "#/components/schemas/Error"}, (method, path)
            if operation["security"]:
                assert "401" in statuses, (method, path)


def test_the_assessment_input_schema_follows_the_rulebook_fields():
    from clinic_app.clinical.rulebook import RULES

    schema = assess_input_schema()
    names = [spec["name"] for spec in RULES["input_fields"]["fields"]]
    assert list(schema["properties"])[:len(names)] == names
    assert schema["required"] == ["age_months", "signs"]
    assert schema["additionalProperties"] is False
    assert schema["properties"]["signs"]["required"] == ["condition", "eyes", "skin_pinch"]


def test_schemathesis_accepts_the_document(app, client, users):
    import schemathesis

    login(client, "admin")
    document = client.get("/api/v1/openapi.json").get_json()
    schema = schemathesis.openapi.from_dict(document)
    operations = [result.ok() for result in schema.get_all_operations()]
    assert len(operations) == len(documented_operations(document))
