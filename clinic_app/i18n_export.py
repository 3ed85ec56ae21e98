"""Catalog facts and the JSON catalogs for the offline JavaScript, from the same .po files.

Run by ``make translations-compile`` (``python -m clinic_app.i18n_export``): writes
static/i18n/<lang>.json for every translations/<lang>/LC_MESSAGES/messages.po, plus en.json
(English is the source language, so its catalog is empty and ``t()`` falls back to the msgid).

Two custom catalog headers carry the review state:
``X-Review-Status: draft`` until a native-speaking health worker reviews the catalog (then
``reviewed``), and ``X-Translation-Complete: yes`` only when every entry has a translation.
"""

from __future__ import annotations

import json
import sys
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path

from babel.messages.pofile import read_po

ROOT = Path(__file__).resolve().parent.parent
TRANSLATIONS = ROOT / "translations"
OUT = ROOT / "static" / "i18n"
RTL = {"ar", "fa", "he", "ur"}


@dataclass(frozen=True)
class CatalogInfo:
    lang: str
    review_status: str  # "source" for English, else "draft" or "reviewed"
    complete: bool

    @property
    def draft(self) -> bool:
        return self.review_status != "reviewed" and self.lang != "en"


def po_path(lang: str, root: Path = TRANSLATIONS) -> Path:
    return root / lang / "LC_MESSAGES" / "messages.po"


def languages(root: Path = TRANSLATIONS) -> list[str]:
    """English plus every language with a catalog on disk."""
    found = sorted(p.parent.parent.name for p in root.glob("*/LC_MESSAGES/messages.po"))
    return ["en", *[lang for lang in found if lang != "en"]]


STATUS_HEADERS = ("X-Review-Status", "X-Translation-Complete")


def _headers(path: Path) -> dict[str, str]:
    """The header entry's fields, read from the text (Babel's reader drops X- fields)."""
    headers: dict[str, str] = {}
    lines = path.read_text(encoding="utf-8").split("\n\n", 1)[0].splitlines()
    for line in lines:
        line = line.strip()
        if line.startswith('"') and ":" in line:
            key, _sep, value = line.strip('"').removesuffix("\\n").partition(":")
            headers[key.strip()] = value.strip()
    return headers


def set_status_headers(path: Path, values: dict[str, str]) -> None:
    """Write the review-status fields into a catalog's header entry (replacing old ones)."""
    text = path.read_text(encoding="utf-8")
    head, sep, rest = text.partition("\n\n")
    lines = [line for line in head.splitlines()
             if not any(line.startswith(f'"{name}:') for name in STATUS_HEADERS)]
    lines += [f'"{name}: {value}\\n"' for name, value in values.items()]
    path.write_text("\n".join(lines) + sep + rest, encoding="utf-8")


def update(root: Path = TRANSLATIONS) -> None:
    """Merge translations/messages.pot into every catalog, keeping the review-status fields."""
    from babel.messages.pofile import write_po

    with (root / "messages.pot").open("rb") as fh:
        template = read_po(fh)
    for lang in languages(root)[1:]:
        path = po_path(lang, root)
        kept = {k: v for k, v in _headers(path).items() if k in STATUS_HEADERS}
        with path.open("rb") as fh:
            catalog = read_po(fh, locale=lang)
        catalog.update(template, no_fuzzy_matching=True)
        with path.open("wb") as fh:
            write_po(fh, catalog, width=0, ignore_obsolete=True)
        set_status_headers(path, {"X-Review-Status": kept.get("X-Review-Status", "draft"),
                                  "X-Translation-Complete": kept.get(
                                      "X-Translation-Complete", "no")})


@lru_cache(maxsize=32)
def _info_cached(lang: str, path: str, mtime: float) -> CatalogInfo:
    headers = _headers(Path(path))
    return CatalogInfo(lang, headers.get("X-Review-Status", "draft").strip().lower(),
                       headers.get("X-Translation-Complete", "no").strip().lower() == "yes")


def catalog_info(lang: str, root: Path = TRANSLATIONS) -> CatalogInfo:
    """Review state of one catalog, read from its header (re-read when the file changes)."""
    path = po_path(lang, root)
    if lang == "en" or not path.exists():
        return CatalogInfo(lang, "source", True)
    return _info_cached(lang, str(path), path.stat().st_mtime)


def catalog_json(lang: str, root: Path = TRANSLATIONS) -> dict:
    """The catalog as the offline JavaScript reads it: {msgid: msgstr or [plural forms]}."""
    messages: dict[str, object] = {}
    info = catalog_info(lang, root)
    if lang != "en":
        with po_path(lang, root).open("rb") as fh:
            catalog = read_po(fh, locale=lang)
        for message in catalog:
            if not message.id or message.fuzzy:
                continue
            if message.pluralizable:
                forms = list(message.string)
                if all(forms):
                    messages[message.id[0]] = forms
            elif message.string:
                messages[message.id] = message.string
    return {"locale": lang, "dir": "rtl" if lang in RTL else "ltr",
            "review_status": info.review_status, "complete": info.complete,
            "messages": messages}


def export(root: Path = TRANSLATIONS, out: Path = OUT) -> list[Path]:
    """Write one JSON file per language; return the paths written."""
    out.mkdir(parents=True, exist_ok=True)
    written = []
    for lang in languages(root):
        path = out / f"{lang}.json"
        path.write_text(json.dumps(catalog_json(lang, root), ensure_ascii=False,
                                   sort_keys=True, separators=(",", ":")), encoding="utf-8")
        written.append(path)
    return written


if __name__ == "__main__":
    if sys.argv[1:] == ["update"]:
        update()
        print("updated the catalogs from translations/messages.pot", file=sys.stderr)
    else:
        paths = export()
        print(f"exported {len(paths)} JSON catalogs to {OUT.relative_to(ROOT)}", file=sys.stderr)
