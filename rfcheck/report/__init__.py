"""The PDF review report: Run → plain dicts → HTML (jinja2) → PDF/A-3 (weasyprint)."""
