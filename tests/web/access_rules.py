"""Who may reach which endpoint: the expected table behind tests/web/test_access_matrix.py.

One entry per Flask endpoint. ``roles`` are the roles that get past the door (any status but
401/403/a redirect to the login page); every other logged-in role must get 403. ``public``
endpoints answer anonymous visitors too; every other endpoint answers anonymous visitors with
401 (under /api/) or a redirect to /login. ``csrf`` says how a state-changing route is guarded:
"token" (form token or X-CSRFToken, refused without), "device" (sync token + X-Clinic-Sync
header instead of a session), or "login" (the login call itself, before any session exists).
``session_status`` is the one status everybody gets, anonymous or logged in, on a route that a
session cannot open at all (the phone uploads, which need a device token instead).
``scope`` notes row-level limits that the matrix cannot see and a dedicated test checks.
"""

from __future__ import annotations

from dataclasses import dataclass

ROLES = ("chw", "nurse", "supervisor", "admin")
ALL = ROLES
CLINIC_STAFF = ("chw", "nurse")
OVERSIGHT = ("supervisor", "admin")
ADMIN = ("admin",)


@dataclass(frozen=True)
class Rule:
    roles: tuple[str, ...] = ALL
    public: bool = False
    csrf: str = "token"
    session_status: int | None = None
    scope: str = ""
    write_roles: tuple[str, ...] | None = None  # narrower roles for POST, when they differ
    ends_on_login_page: bool = False  # success is a redirect to /login (logging out)


RULES: dict[str, Rule] = {
    # Foundation (issue 2)
    "static": Rule(public=True),
    "auth.login": Rule(public=True, csrf="token"),
    "auth.logout": Rule(public=True, ends_on_login_page=True),
    "home.index": Rule(),
    "account.password": Rule(scope="the user's own password only"),
    "api.ping": Rule(public=True),
    "api.login": Rule(public=True, csrf="login"),
    "api.logout": Rule(),
    "api.me": Rule(),
    # Clinical core (issue 3)
    "api.assess_route": Rule(),
    "api.rulebook_route": Rule(),
    # Offline phones and sync (issue 4)
    "api.register_device": Rule(),
    "api.upload_cases": Rule(public=True, csrf="device", session_status=401,
                             scope="device token, not a session: 401 without one; a disabled "
                                   "user's phone is quarantined (test_disabling_...)"),
    "api.get_case": Rule(scope="a CHW reads only their own cases, others get 404 "
                               "(test_a_chw_cannot_read_another_chws_case)"),
    "pwa.manifest": Rule(public=True),
    "pwa.service_worker": Rule(public=True),
    # Phone screens without JavaScript (issue 4)
    "assess.new": Rule(),
    "assess.saved": Rule(scope="the saver's own case, like api.get_case"),
    # Caregiver sheets (issue 5)
    "sheets.case_sheet": Rule(scope="cases the user may read (404 otherwise)"),
    "sheets.case_pdf": Rule(scope="cases the user may read (404 otherwise)"),
    "sheets.quick": Rule(),
    "sheets.offline": Rule(scope="a page shell; the sheet data stays on the phone"),
    "sheets.choose_language": Rule(public=True),
    # After the first assessment (issue 6)
    "cases.index": Rule(scope="a CHW lists only their own cases"),
    "cases.due": Rule(scope="a CHW sees only their own due list"),
    "cases.detail": Rule(scope="cases the user may read (404 otherwise)"),
    "cases.reassess": Rule(scope="cases the user may read (404 otherwise)"),
    "cases.monitor": Rule(scope="cases the user may read (404 otherwise)"),
    "cases.outcome": Rule(scope="cases the user may read (404 otherwise)"),
    "cases.visit_done": Rule(scope="cases the user may read (404 otherwise)"),
    "api.due_now": Rule(scope="the user's own scope, like cases.due"),
    "api.upload_reassessments": Rule(public=True, csrf="device", session_status=401,
                                     scope="device token, like api.upload_cases"),
    "api.upload_monitoring": Rule(public=True, csrf="device", session_status=401,
                                  scope="device token, like api.upload_cases"),
    "api.upload_outcomes": Rule(public=True, csrf="device", session_status=401,
                                scope="device token, like api.upload_cases"),
    # Supervisor view (issue 7)
    "api.tallies_route": Rule(roles=OVERSIGHT),
    "supervisor.index": Rule(roles=OVERSIGHT),
    "supervisor.alerts": Rule(roles=OVERSIGHT),
    "supervisor.acknowledge": Rule(roles=OVERSIGHT),
    "supervisor.export_cases": Rule(roles=OVERSIGHT),
    "supervisor.export_report": Rule(roles=OVERSIGHT),
    "supervisor.export_weekly": Rule(roles=OVERSIGHT),
    "supervisor.supplies": Rule(roles=("nurse", "supervisor", "admin"),
                                write_roles=("nurse", "admin"),
                                scope="supervisors read the stock, nurses and admins record it"),
    # Evidence (issue 9)
    "api.openapi_document": Rule(),
    # Serving a clinic (issue 8): the enrolment pages a phone opens before it trusts the CA
    "enrol.index": Rule(public=True),
    "enrol.ca_certificate": Rule(public=True),
    "enrol.qr_code": Rule(public=True),
    "enrol.enrol_qr_code": Rule(public=True),
    "enrol.ready": Rule(public=True),
    # Clinic administration (issue 8)
    "admin.index": Rule(roles=ADMIN),
    "admin.users_page": Rule(roles=ADMIN),
    "admin.disable_user": Rule(roles=ADMIN),
    "admin.enable_user": Rule(roles=ADMIN),
    "admin.reset_password": Rule(roles=ADMIN),
    "admin.devices_page": Rule(roles=ADMIN),
    "admin.revoke_device": Rule(roles=ADMIN),
    "admin.settings_page": Rule(roles=ADMIN),
}
