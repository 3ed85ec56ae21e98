"""A one-time password works once: its owner must choose their own before anything else."""

import re

from tests.conftest import login


def _create_user(client, admin_csrf, username="halima"):
    response = client.post("/admin/users", data={"username": username, "role": "chw",
                                                  "area": "Siwelo", "csrf_token": admin_csrf})
    return re.search(r'id="one-time-password">([a-z0-9-]+)<',
                     response.get_data(as_text=True)).group(1)


def _fresh_user(app, users):
    admin = app.test_client()
    password = _create_user(admin, login(admin, "admin"))
    worker = app.test_client()
    csrf = login(worker, "halima", password)
    return worker, csrf, password


def test_a_user_with_a_one_time_password_is_sent_to_choose_their_own(app, users):
    worker, _csrf, _password = _fresh_user(app, users)
    response = worker.get("/")
    assert response.status_code == 302 and response.headers["Location"].endswith(
        "/account/password")
    api = worker.get("/api/v1/me")
    assert api.status_code == 403
    assert api.get_json()["error"]["code"] == "password_change_required"


def test_choosing_a_new_password_unlocks_the_app_and_retires_the_one_time_one(app, users):
    worker, csrf, password = _fresh_user(app, users)
    response = worker.post("/account/password", data={
        "current": password, "new": "river-stone-42", "confirm": "river-stone-42",
        "csrf_token": csrf})
    assert response.status_code == 302
    assert worker.get("/").status_code == 200
    again = app.test_client().post("/api/v1/login", json={"username": "halima",
                                                          "password": password})
    assert again.status_code == 401
    login(app.test_client(), "halima", "river-stone-42")


def test_it_refuses_a_wrong_given_password_a_short_one_and_the_same_one(app, users):
    worker, csrf, password = _fresh_user(app, users)
    cases = [
        ({"current": "wrong-password", "new": "river-stone-42", "confirm": "river-stone-42"},
         "not the password you were given"),
        ({"current": password, "new": "short", "confirm": "short"}, "at least 8 characters"),
        ({"current": password, "new": password, "confirm": password}, "different from"),
        ({"current": password, "new": "river-stone-42", "confirm": "river-stone-43"},
         "two new passwords differ"),
    ]
    for data, message in cases:
        response = worker.post("/account/password", data={**data, "csrf_token": csrf})
        assert response.status_code == 400 and message in response.get_data(as_text=True)
    assert worker.get("/").status_code == 302  # still must change


def test_users_without_a_one_time_password_are_not_stopped(client, users):
    login(client, "nurse")
    assert client.get("/").status_code == 200
