"""The list of languages comes from translations/ on disk, read again when a folder changes."""

from __future__ import annotations

import os

from clinic_app.i18n import available_locales


def test_a_language_folder_added_or_removed_changes_the_list(app, tmp_path):
    root = tmp_path / "translations"
    (root / "fr" / "LC_MESSAGES").mkdir(parents=True)
    (root / "fr" / "LC_MESSAGES" / "messages.po").write_text("")
    app.config["BABEL_TRANSLATION_DIRECTORIES"] = str(root)
    with app.app_context():
        assert available_locales() == ["en", "fr"]
        (root / "sw" / "LC_MESSAGES").mkdir(parents=True)
        (root / "sw" / "LC_MESSAGES" / "messages.po").write_text("")
        os.utime(root, ns=(1, 1))  # a new modification time, as adding a folder gives
        assert available_locales() == ["en", "fr", "sw"]
        (root / "sw" / "LC_MESSAGES" / "messages.po").unlink()
        os.utime(root, ns=(2, 2))
        assert available_locales() == ["en", "fr"]


def test_the_project_languages_are_all_found(app):
    with app.app_context():
        assert available_locales() == ["en", "ar", "es", "fr", "hi", "pt", "sw"]
