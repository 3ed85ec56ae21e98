"""PDF rendering through WeasyPrint: local static files only, no cookies, a small cache.

WeasyPrint is imported inside the functions, so the app starts (and most tests run) without
paying for its import. The page HTML is rendered by Flask's Jinja from the same template as
the screen version; WeasyPrint then fetches the stylesheets, fonts and pictograms it links to
through ``LocalStaticFetcher``, which reads them straight from the static folder and refuses
every other address: nothing leaves the machine and no request carries the user's cookies.
"""

from __future__ import annotations

import functools
import threading
from collections import OrderedDict
from collections.abc import Callable
from pathlib import Path
from urllib.parse import unquote, urlsplit

from flask import current_app, render_template

# The documents are rendered with this made-up origin as base URL, so "/static/x.css" in the
# template becomes an address the fetcher recognises. ".invalid" can never resolve (RFC 2606).
BASE_URL = "http://sheet.invalid/"
_STATIC_PREFIX = "/static/"
_TYPES = {".css": "text/css", ".svg": "image/svg+xml", ".ttf": "font/ttf", ".png": "image/png",
          ".woff2": "font/woff2", ".woff": "font/woff"}


class RefusedURL(ValueError):
    """An address the PDF renderer is not allowed to fetch."""


def static_path(url: str, static_root: str | Path) -> Path:
    """Map a document address to a file in the static folder, or raise RefusedURL."""
    parts = urlsplit(url)
    if f"{parts.scheme}://{parts.netloc}/" != BASE_URL or not parts.path.startswith(
            _STATIC_PREFIX):
        raise RefusedURL(f"only local static files may be fetched, not {url!r}")
    root = Path(static_root).resolve()
    target = (root / unquote(parts.path[len(_STATIC_PREFIX):])).resolve()
    if not target.is_relative_to(root) or not target.is_file():
        raise RefusedURL(f"no such static file: {url!r}")
    return target


def _fetcher_class():
    from weasyprint.urls import URLFetcher, URLFetcherResponse

    class LocalStaticFetcher(URLFetcher):
        """Serves /static/ files from disk; refuses file:, data:, http(s) and everything else."""

        def __init__(self, static_root: str):
            super().__init__(allowed_protocols=("http",), allow_redirects=False)
            self.static_root = static_root

        def fetch(self, url, headers=None):
            path = static_path(url, self.static_root)
            return URLFetcherResponse(url, path.read_bytes(),
                                      {"Content-Type": _TYPES.get(path.suffix,
                                                                  "application/octet-stream")})

    return LocalStaticFetcher


def local_fetcher(static_root: str | Path):
    """A WeasyPrint URL fetcher that serves only files under ``static_root``."""
    return _fetcher_class()(str(static_root))


# The PDF operators a pictogram may use to be replayed: paths, strokes and fills, colours,
# line styles, transforms and WeasyPrint's alpha states (``/A1.0 gs``). Anything else (an
# image, a clip, text, a pattern or shading) needs resources or state we do not track.
_REPLAYABLE = frozenset(b"q Q cm w J j M d RG rg m l c v y h re S s f f* B B* b b* n gs".split())
# WeasyPrint's stream remembers its current colours and alphas to skip repeated operators;
# a recorded drawing is only valid from the same remembered state.
_PEN = ("_current_color", "_current_color_stroke", "_current_alpha", "_current_alpha_stroke")


class _ReplayedSVG:
    """An SVG image of the shared cache whose drawing is recorded once per size and pen.

    WeasyPrint walks the SVG tree again for every picture of every render: for the sheet's
    two dozen pictograms that was a third of writing the PDF. Drawing a pictogram depends
    only on its size and the pen state it starts from, so its operators are kept and appended
    again next time. Drawings with other operators are not recorded: WeasyPrint draws them.
    """

    def __init__(self, image):
        self._image = image
        self._sizes: dict[tuple, tuple] = {}
        self._takes: dict[tuple, tuple | None] = {}

    def get_intrinsic_size(self, image_resolution, font_size):
        key = (image_resolution, font_size)
        if key not in self._sizes:
            self._sizes[key] = self._image.get_intrinsic_size(image_resolution, font_size)
        return self._sizes[key]

    def draw(self, stream, width, height, style):
        try:
            key = (width, height, tuple(getattr(stream, name) for name in _PEN))
            ops, depth = stream.stream, len(stream._ctm_stack)
            states = stream._resources["ExtGState"]
        except (AttributeError, KeyError, TypeError):  # a WeasyPrint we do not know
            return self._image.draw(stream, width, height, style)
        take = self._takes.get(key)
        if take:
            recorded, used_states, pen = take
            ops.extend(recorded)
            for name, state in used_states.items():
                states.setdefault(name, state)
            for name, value in zip(_PEN, pen, strict=True):
                setattr(stream, name, value)
            return
        start = len(ops)
        before = ops[start - 1] if start else None
        self._image.draw(stream, width, height, style)
        if key not in self._takes:
            self._takes[key] = self._recording(stream, start, before, depth)

    @staticmethod
    def _recording(stream, start: int, before, depth: int) -> tuple | None:
        """(operators, alpha states they name, pen after), or None if not replayable."""
        ops = stream.stream
        if len(ops) <= start or (start and ops[start - 1] is not before) or (
                len(stream._ctm_stack) != depth):
            return None
        recorded = ops[start:]
        used = {}
        for op in recorded:
            if not isinstance(op, bytes) or op.rsplit(b" ", 1)[-1] not in _REPLAYABLE:
                return None
            if op.endswith(b" gs"):
                name = op[1:-3].decode()
                if not op.startswith(b"/") or name not in stream._resources["ExtGState"]:
                    return None
                used[name] = stream._resources["ExtGState"][name]
        return recorded, used, tuple(getattr(stream, name) for name in _PEN)


class _ImageCache(dict):
    """WeasyPrint's image cache (url -> image), with SVG images wrapped for replay."""

    def __setitem__(self, url, image):
        from weasyprint.images import SVGImage

        super().__setitem__(url, _ReplayedSVG(image) if isinstance(image, SVGImage) else image)


class _Shared:
    """Parsed stylesheets, their loaded fonts and decoded images, kept between renders.

    Loading six font files and parsing and drawing every pictogram again for each sheet
    costs more than laying the page out; one lock serialises renders because these objects
    are shared.
    """

    def __init__(self, static_root: str):
        from weasyprint.text.fonts import FontConfiguration

        self.fetcher = local_fetcher(static_root)
        self.fonts = FontConfiguration()
        self.stylesheets: dict[str, object] = {}
        self.images = _ImageCache()
        self.lock = threading.Lock()

    def stylesheet(self, name: str, *, user_agent: bool = False):
        import weasyprint
        from weasyprint.html import UA_COUNTER_STYLE

        if name not in self.stylesheets:
            # A user-agent sheet is parsed with WeasyPrint's counter styles (disc, decimal...).
            extra = {"counter_style": UA_COUNTER_STYLE} if user_agent else {}
            self.stylesheets[name] = weasyprint.CSS(url=f"{BASE_URL}static/{name}",
                                                    url_fetcher=self.fetcher,
                                                    font_config=self.fonts, **extra)
        return self.stylesheets[name]


_shared: dict[str, _Shared] = {}
_shared_lock = threading.Lock()


def _state(static_root: str) -> _Shared:
    with _shared_lock:
        if static_root not in _shared:
            _shared[static_root] = _Shared(static_root)
        return _shared[static_root]


def xml_tree(html: str):
    """The element tree of ``html`` if it is well-formed XML (polyglot markup), else None.

    Expat, in C, reads the sheet in a fraction of a millisecond where WeasyPrint's HTML5
    parser, in Python, takes several. Both give the same tree for polyglot markup: lower-case
    HTML elements, void elements closed with "/>", only the five XML character references.
    """
    from xml.etree import ElementTree

    try:
        root = ElementTree.fromstring(html)
    except ElementTree.ParseError:
        return None
    return root if root.tag == "html" else None


@functools.cache
def _document_class():
    import cssselect2
    import weasyprint

    class PageDocument(weasyprint.HTML):
        """weasyprint.HTML for the app's own templates, with two shortcuts.

        - Markup that is well-formed XML is parsed by expat instead of the HTML5 parser.
        - ``user_agent`` (a parsed stylesheet) replaces WeasyPrint's HTML user-agent sheet.

        Both go through WeasyPrint internals (the parsed-tree attributes and
        ``_ua_stylesheets``); if a WeasyPrint release renames them, the document falls back
        to WeasyPrint's own parser and sheet: the same page, only slower.
        """

        def __init__(self, string: str, base_url: str, url_fetcher, user_agent=None):
            self.user_agent = user_agent
            tree = xml_tree(string)
            super().__init__(string="<html></html>" if tree is not None else string,
                             base_url=base_url, url_fetcher=url_fetcher)
            if tree is None:
                return
            if not all(hasattr(self, name) for name in ("wrapper_element", "etree_element")):
                super().__init__(string=string, base_url=base_url, url_fetcher=url_fetcher)
                return
            self.wrapper_element = cssselect2.ElementWrapper.from_html_root(
                tree, content_language=None)
            self.etree_element = self.wrapper_element.etree_element

        def _ua_stylesheets(self, forms=False):
            if self.user_agent is None or forms:
                return super()._ua_stylesheets(forms)
            return [self.user_agent]

    return PageDocument


def html_to_pdf(html: str, static_root: str | Path, stylesheets: tuple[str, ...] = (),
                zoom: float = 1, user_agent: str | None = None) -> bytes:
    """Turn an HTML string into PDF bytes, fetching only files under ``static_root``.

    ``stylesheets`` (paths under static/, e.g. "css/sheet.css") are parsed once per process
    and applied to the page; the HTML should then not link them itself. ``zoom`` scales
    pages and content together (an A4 layout at 1/sqrt(2) is an A5 page). ``user_agent``
    (a path under static/) replaces WeasyPrint's HTML user-agent stylesheet: only for a
    template whose elements it covers (see static/css/sheet-ua.css).
    """
    state = _state(str(static_root))
    with state.lock:
        sheets = [state.stylesheet(name) for name in stylesheets]
        agent = state.stylesheet(user_agent, user_agent=True) if user_agent else None
        document = _document_class()(html, BASE_URL, state.fetcher, user_agent=agent)
        return document.write_pdf(stylesheets=sheets, font_config=state.fonts,
                                  cache=state.images, zoom=zoom)


def render_pdf(template: str, stylesheets: tuple[str, ...] = (), zoom: float = 1,
               user_agent: str | None = None, **ctx) -> bytes:
    """Render a Jinja template of the app to PDF bytes (call inside a request or app context).

    The template sees ``for_pdf=True`` so it can leave out the links to ``stylesheets``.
    """
    html = render_template(template, for_pdf=True, **ctx)
    return html_to_pdf(html, current_app.static_folder, stylesheets, zoom, user_agent)


class PdfCache:
    """A small least-recently-used cache of rendered PDFs, keyed by what determines the bytes.

    The caller builds the key (for a case sheet: case id, content hash, language, page size
    and settings version), so an edited case or changed settings simply miss the cache.
    """

    def __init__(self, max_items: int = 64):
        self.max_items = max_items
        self._items: OrderedDict[tuple, bytes] = OrderedDict()
        self._lock = threading.Lock()

    def get_or_render(self, key: tuple, render: Callable[[], bytes]) -> tuple[bytes, bool]:
        """Return (pdf bytes, True when served from the cache)."""
        with self._lock:
            if key in self._items:
                self._items.move_to_end(key)
                return self._items[key], True
        pdf = render()
        with self._lock:
            self._items[key] = pdf
            self._items.move_to_end(key)
            while len(self._items) > self.max_items:
                self._items.popitem(last=False)
        return pdf, False

    def clear(self) -> None:
        with self._lock:
            self._items.clear()


cache = PdfCache()
