"""HTML (jinja2) → archival PDF/A-3 (weasyprint) with every input file, the default policy and
the results attached (byte for byte what was checked)."""

from __future__ import annotations

import datetime as dt
import json
import os
from importlib import resources
from pathlib import Path

from . import context as report_context
from .figures import all_figures

#: fixed timestamp for attachments and the PDF itself (reproducible output)
_EPOCH = dt.datetime(2000, 1, 1, tzinfo=dt.timezone.utc)


def templates_dir() -> Path:
    return Path(str(resources.files("rfcheck.templates")))


def _font_dir() -> Path:
    import matplotlib

    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


def render_html(run) -> str:
    import jinja2

    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(templates_dir())),
        autoescape=jinja2.select_autoescape(["html", "j2"]),
        undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True)
    data = report_context.build(run, all_figures(run))
    data["font_dir"] = _font_dir().as_uri()
    return env.get_template("report.html.j2").render(**data)


def _fetcher():
    from weasyprint.urls import URLFetcher

    allowed = [templates_dir().resolve(), _font_dir().resolve()]

    class PackagedOnly(URLFetcher):
        """Fetch only packaged templates and fonts: no network, no arbitrary files."""

        def fetch(self, url, headers=None):
            if url.startswith("file://"):
                from urllib.parse import unquote, urlparse

                p = Path(unquote(urlparse(url).path)).resolve()
                if any(p.is_relative_to(a) for a in allowed):
                    return super().fetch(url, headers)
            if url.startswith("data:"):
                return super().fetch(url, headers)
            raise ValueError(f"report refuses to fetch {url}")

    return PackagedOnly()


def render_pdf(run) -> bytes:
    """The PDF/A-3b review report as bytes (identical bytes for identical runs)."""
    os.environ.setdefault("SOURCE_DATE_EPOCH", str(int(_EPOCH.timestamp())))
    import weasyprint

    html = render_html(run)
    results = json.dumps(run.to_json(), indent=2, allow_nan=False)
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
    if default_policy is not None:
        attachments.append(weasyprint.Attachment(
            string=run.policy_texts[0][1], name=default_policy,
            description="review policy: the shipped defaults", created=_EPOCH, modified=_EPOCH,
            relationship="Source"))
    doc = weasyprint.HTML(string=html, base_url=templates_dir().as_uri() + "/",
                          url_fetcher=_fetcher())
    return doc.write_pdf(pdf_variant="pdf/a-3b", attachments=attachments, pdf_identifier=True,
                         custom_metadata=True)
