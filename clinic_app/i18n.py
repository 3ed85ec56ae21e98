"""Translations: Flask-Babel, with the list of locales derived from translations/ on disk."""

from __future__ import annotations

import functools
from pathlib import Path

from flask import current_app, request, session
from flask_babel import Babel, get_locale, lazy_gettext, ngettext
from flask_babel import gettext as _

__all__ = ["_", "lazy_gettext", "ngettext", "available_locales", "text_direction", "init_app",
           "get_locale"]

RTL_LANGUAGES = {"ar", "fa", "he", "ur"}


def available_locales() -> list[str]:
    """English plus every folder in translations/ that holds a catalog."""
    root = Path(current_app.config["BABEL_TRANSLATION_DIRECTORIES"])
    try:
        # Adding or removing a language folder changes the folder's modification time.
        stamp = root.stat().st_mtime_ns
    except OSError:
        stamp = None
    return list(_locales_in(str(root), stamp))


@functools.lru_cache(maxsize=8)
def _locales_in(root: str, _stamp: int | None) -> tuple[str, ...]:
    found = {p.parent.parent.name for p in Path(root).glob("*/LC_MESSAGES/messages.po")}
    return ("en", *sorted(found - {"en"}))


def text_direction(locale: str | None = None) -> str:
    lang = str(locale or get_locale() or "en").split("_")[0]
    return "rtl" if lang in RTL_LANGUAGES else "ltr"


def select_locale() -> str:
    locales = available_locales()
    wanted = request.args.get("lang") or session.get("lang")
    if wanted in locales:
        return wanted
    return request.accept_languages.best_match(locales) or current_app.config["DEFAULT_LOCALE"]


def init_app(app) -> None:
    Babel(app, locale_selector=select_locale)

    @app.context_processor
    def _i18n_context():
        locale = str(get_locale() or "en")
        return {"current_locale": locale, "text_dir": text_direction(locale)}
