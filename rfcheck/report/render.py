"""HTML (jinja2) → archival PDF/A-3 (weasyprint) with every input file, the default policy and
the results attached (byte for byte what was checked)."""

from __future__ import annotations

import datetime as dt
import os
from importlib import resources
from pathlib import Path

from rfcheck import jsontext

from . import context as report_context
from .figures import all_figures

#: fixed timestamp for attachments and the PDF itself (reproducible output)
_EPOCH = dt.datetime(2000, 1, 1, tzinfo=dt.timezone.utc)


def templates_dir() -> Path:
    return Path(str(resources.files("rfcheck.templates")))


def _font_dir() -> Path:
    import matplotlib

    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


def _autoescape(name: str | None) -> bool:
    """Escape everything the templates print, except the packaged stylesheet they include."""
    return not (name or "").endswith(".css")


#: the two media the one template renders: the PDF (weasyprint) and the on-screen page
MEDIA = ("pdf", "screen")


def render_html(run, medium: str = "pdf") -> str:
    """The report as one HTML page, for the PDF renderer (``medium="pdf"``: packaged fonts by
    ``file:`` URL, paged media) or for a browser (``"screen"``: self-contained, see
    :func:`render_screen_html`). Every value from the run is escaped (autoescape); a name
    the template uses but the context lacks is an error, never an empty string
    (StrictUndefined). Only the figures' SVG, made by matplotlib, is inserted as markup."""
    import jinja2

    if medium not in MEDIA:
        raise ValueError(f"medium must be one of {MEDIA}, not {medium!r}")
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir())), autoescape=_autoescape,
        undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True)
    figures = all_figures(run)
    data = report_context.build(run, figures if medium == "screen" else
                                [{**f, "svg": svg_image(f["svg"])} for f in figures])
    if medium == "pdf" and data.get("glance") and data["glance"].get("figure"):
        g = data["glance"]["figure"]
        data["glance"] = {**data["glance"], "figure": {**g, "svg": svg_image(g["svg"])}}
    data["medium"] = medium
    data["font_dir"] = _font_dir().as_uri() if medium == "pdf" else ""
    return env.get_template("report.html.j2").render(**data)


def svg_image(svg: str) -> str:
    """A figure's SVG as an ``<img>`` of a ``data:`` URI, for the PDF renderer: weasyprint
    draws it with the same SVG code as inline markup (same vectors, same text), but its
    elements stay out of the HTML document's style cascade, which costs about a third of the
    layout time of a report with inline figures (measured on the bench example: layout
    2.5 → 1.8 s). The browser page keeps inline SVG."""
    import base64

    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return f'<img class="figure" alt="" src="data:image/svg+xml;base64,{data}">'


def render_screen_html(run) -> bytes:
    """The same report as one self-contained HTML page for on-screen review (UTF-8 bytes).

    Same template and context as the PDF. Figures are inline SVG (a raster inside one is a
    ``data:`` URI); fonts come from the reader's machine (``local()`` DejaVu Sans, else the
    browser's sans-serif): the page references no file and no network address and needs no
    script. weasyprint is not imported.
    """
    return render_html(run, medium="screen").encode("utf-8")


#: what the PDF renderer may read: the templates and the four fonts the stylesheet names
_FONTS = ("DejaVuSans.ttf", "DejaVuSans-Bold.ttf", "DejaVuSans-Oblique.ttf", "DejaVuSansMono.ttf")
_TYPES = {".ttf": "font/ttf", ".css": "text/css", ".svg": "image/svg+xml", ".png": "image/png"}


def _allowed_files() -> set[Path]:
    out = {(_font_dir() / f).resolve() for f in _FONTS}
    out |= {p.resolve() for p in templates_dir().iterdir() if p.suffix in _TYPES}
    return out


def _fetcher():
    """A URL fetcher for weasyprint that serves only packaged resources.

    Served: the packaged templates folder's stylesheets and images and the four packaged fonts
    (read here, by exact resolved path, never through urllib), and ``data:`` URIs. Refused,
    and recorded in ``refused``: every other ``file:`` path (``/etc/passwd``, a path that
    leaves the package through ``..`` or a link), and every other scheme (http, https, ftp,
    …): no request ever leaves the process. weasyprint reports a refused resource as a
    warning and leaves it out; the text around it renders as text.
    """
    from urllib.parse import unquote, urlsplit

    from weasyprint.urls import URLFetcher, URLFetcherResponse

    allowed = _allowed_files()

    class PackagedOnly(URLFetcher):
        def __init__(self):
            super().__init__(allowed_protocols=("data",))
            self.served: list[str] = []
            self.refused: list[str] = []

        def fetch(self, url, headers=None):
            scheme = url.split(":", 1)[0].lower() if ":" in url else ""
            if scheme == "data":
                self.served.append(url[:40])
                return super().fetch(url, headers)
            if scheme == "file":
                parts = urlsplit(url)
                path = Path(unquote(parts.path)).resolve() if parts.netloc in ("", "localhost") else None
                if path is not None and path in allowed and path.is_file():
                    self.served.append(url)
                    return URLFetcherResponse(url, body=path.read_bytes(),
                                              headers={"Content-Type": _TYPES[path.suffix]})
            self.refused.append(url)
            raise ValueError(f"the report refuses to fetch {url[:200]}: only packaged resources")

    return PackagedOnly()


def render_pdf(run) -> bytes:
    """The PDF/A-3b review report as bytes (identical bytes for identical runs)."""
    import weasyprint

    html = render_html(run)
    results = jsontext.dumps(run.to_json())
    inputs, default_policy = report_context.input_attachments(run)
    attachments = [
        weasyprint.Attachment(string=rec.data, name=name, description=f"input file: {rec.role} "
                              f"({rec.file}), as checked", created=_EPOCH, modified=_EPOCH,
                              relationship="Source")
        for rec, name in inputs]
    attachments.append(weasyprint.Attachment(
        string=results, name=report_context.RESULTS_ATTACHMENT,
        description="results (rfcheck-run/1 JSON)", created=_EPOCH, modified=_EPOCH,
        relationship="Data"))
    taken = {n.casefold() for _, n in inputs} | {report_context.RESULTS_ATTACHMENT.casefold(),
                                                  (default_policy or "").casefold()}
    attachments += [
        weasyprint.Attachment(string=rec.data, name=name, description=f"previous revision's "
                              f"input file: {rec.role} ({rec.file})", created=_EPOCH,
                              modified=_EPOCH, relationship="Source")
        for rec, name in report_context.previous_attachments(run, taken)]
    if default_policy is not None:
        attachments.append(weasyprint.Attachment(
            string=run.policy_texts[0][1], name=default_policy,
            description="review policy: the shipped defaults", created=_EPOCH, modified=_EPOCH,
            relationship="Source"))
    return write_archival_pdf(html, attachments)


def write_archival_pdf(html: str, attachments: list) -> bytes:
    """PDF/A-3b bytes of `html` (packaged resources only) with `attachments`
    (weasyprint.Attachment), the same bytes for the same input whenever it is written."""
    import weasyprint

    doc = weasyprint.HTML(string=html, base_url=templates_dir().as_uri() + "/",
                          url_fetcher=_fetcher())
    # fontTools, which weasyprint subsets fonts with where HarfBuzz's subsetter is missing,
    # stamps each subset's `head.modified` with SOURCE_DATE_EPOCH (else the present time):
    # the embedded font streams changed with the variable. The report states no creation
    # date, so the variable is pinned to the fixed epoch while the PDF is written and the
    # caller's value is restored after: the bytes never depend on it.
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    os.environ["SOURCE_DATE_EPOCH"] = str(int(_EPOCH.timestamp()))
    try:
        return doc.write_pdf(pdf_variant="pdf/a-3b", attachments=attachments,
                             pdf_identifier=True, custom_metadata=True)
    finally:
        if saved is None:
            del os.environ["SOURCE_DATE_EPOCH"]
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved
