"""The report of a sweep or tolerance study (``rfcheck-sweep/1``) as HTML and archival PDF.

The study dict (``rfcheck sweep``'s JSON) is read as it is: this module selects, counts and
formats, and draws the figures of :mod:`rfcheck.report.figure_sweep`; it evaluates no rule.
The render machinery is the review report's (:mod:`rfcheck.report.render`): the packaged
fonts, the fetcher that serves only packaged resources, autoescape, ``StrictUndefined``
and the fixed epoch, so identical studies give identical PDF bytes. The study's JSON is
attached to the PDF/A-3b byte for byte as rendered.

Wording: a map of verdicts is a design aid. The report says what each point's verdict
covers and that an operating point chosen from a passing region is still reviewed in its own
check and signed off there, under the local codes, by qualified personnel.
"""

from __future__ import annotations

import math

from rfcheck import jsontext
from rfcheck.spec import InputError, Problem

from . import render
from .cautions import select_cautions
from .figure_sweep import VERDICT_WORDS, VERDICTS, sweep_figures

#: the study schema this report reads
SCHEMA = "rfcheck-sweep/1"
#: name of the study's JSON attached to the PDF
SWEEP_ATTACHMENT = "rfcheck-sweep.json"
#: longest lists printed in full (the JSON attached holds every point)
MAX_ROWS = 40
_KINDS = ("grid", "monte-carlo")
_REQUIRED = ("kind", "tool", "spec", "policy", "axes", "shape", "points", "nominal", "counts")


def check_sweep(sweep) -> None:
    """Refuse a dict that is not a study this report can read, naming each key and what was
    expected (:class:`rfcheck.spec.InputError`, exit code 2 through the CLI)."""
    where = "sweep results"
    problems = []

    def bad(path: str, expected: str):
        problems.append(Problem(where, path, None, f"expected {expected}"))

    if not isinstance(sweep, dict):
        raise InputError([Problem(where, "", None, "expected a JSON object (rfcheck-sweep/1)")])
    if sweep.get("schema") != SCHEMA:
        bad("schema", f'"{SCHEMA}", found {str(sweep.get("schema"))[:40]!r}')
    for key in _REQUIRED:
        if key not in sweep:
            bad(key, "this key (missing)")
    if problems:
        raise InputError(problems)
    if sweep["kind"] not in _KINDS:
        bad("kind", f'"grid" or "monte-carlo", found {str(sweep["kind"])[:40]!r}')
    axes = sweep["axes"]
    if not isinstance(axes, list) or not axes:
        bad("axes", "a non-empty list of axes")
        axes = []
    for k, a in enumerate(axes):
        if not isinstance(a, dict) or not isinstance(a.get("key"), str):
            bad(f"axes[{k}].key", "the spec key swept, as text")
        elif sweep["kind"] == "monte-carlo" and a.get("values") is None:
            continue  # the samples are in the points
        elif not isinstance(a.get("values"), list) or not a["values"] or not all(
                isinstance(v, (int, float)) and math.isfinite(v) for v in a["values"]):
            bad(f"axes[{k}].values", "a non-empty list of finite numbers"
                + (" (or null: the samples are in the points)" if sweep["kind"] == "monte-carlo" else ""))
    shape = sweep["shape"]
    if not isinstance(shape, list) or not all(isinstance(n, int) and n > 0 for n in shape):
        bad("shape", "a list of positive integers")
        shape = []
    elif sweep["kind"] == "grid" and len(shape) != len(axes):
        bad("shape", f"one size per axis ({len(axes)}), found {len(shape)}")
    mc = sweep.get("monte_carlo")
    if sweep["kind"] == "monte-carlo":
        if not isinstance(mc, dict):
            bad("monte_carlo", "the Monte Carlo summary of a monte-carlo study")
        else:
            for key in ("samples", "seed", "distribution", "pass_probability"):
                if key not in mc:
                    bad(f"monte_carlo.{key}", "this key (missing)")
            prob = mc.get("pass_probability")
            estimates = ([("overall", prob.get("overall"))]
                         + list((prob.get("rules") or {}).items()) if isinstance(prob, dict) else [])
            for name, r in estimates:
                if not isinstance(r, dict) or not all(
                        isinstance(r.get(f), (int, float)) for f in ("p", "low", "high", "passes", "n")):
                    bad(f"monte_carlo.pass_probability.{'' if name == 'overall' else 'rules.'}{name}",
                        "numbers p, low, high, passes and n")
    for key in ("counts", "nominal", "tool", "spec", "policy"):
        if not isinstance(sweep[key], dict):
            bad(key, "a JSON object")
    points = sweep["points"]
    if not isinstance(points, list):
        bad("points", "a list of points")
        points = []
    elif not problems and len(points) != math.prod(shape):
        bad("points", f"one point per grid point or sample ({math.prod(shape)} for the shape "
                      f"{shape}), found {len(points)}")
    for k, p in enumerate(points):
        if not isinstance(p, dict) or p.get("verdict") not in VERDICTS:
            bad(f"points[{k}].verdict", "one of " + ", ".join(VERDICTS))
            break
        idx = p.get("index")
        if shape and (not isinstance(idx, list) or len(idx) != len(shape)
                or not all(isinstance(i, int) and 0 <= i < n for i, n in zip(idx, shape))):
            bad(f"points[{k}].index", f"{len(shape)} indices within the shape {shape}")
            break
    if problems:
        raise InputError(problems)


def _num(value, digits: int = 4) -> str:
    return "—" if value is None else f"{value:.{digits}g}"


def _axis_rows(sweep: dict) -> list[dict]:
    rows = []
    nominal = (sweep.get("nominal") or {}).get("values", {})
    for a in sweep["axes"]:
        if a.get("values") is not None:
            values = [float(v) for v in a["values"]]
        else:  # Monte Carlo: the sampled values are in the points
            values = [float(p["values"][a["key"]]) for p in sweep["points"]
                      if isinstance(p.get("values", {}).get(a["key"]), (int, float))]
        tol = a.get("tolerance")
        nom = nominal.get(a["key"], a.get("nominal"))
        rows.append({"key": a["key"], "unit": a.get("unit") or "",
                     "start": _num(values[0]) if values else "—",
                     "stop": _num(values[-1]) if values else "—",
                     "low": _num(min(values)) if values else "—",
                     "high": _num(max(values)) if values else "—",
                     "n": len(values), "nominal": _num(nom),
                     "tolerance": f"{_num(min(tol))} to {_num(max(tol))}" if tol else "none declared"})
    return rows


def _count_rows(sweep: dict) -> tuple[list[dict], int]:
    """Points of each verdict, and how many of the passing ones carry a waived finding."""
    counts = sweep["counts"]
    total = sum(int(counts.get(v, 0)) for v in VERDICTS) or 1
    waived = sum(1 for p in sweep["points"] if p["verdict"] in ("pass", "warn") and any(
        r.get("status") == "waived" for r in (p.get("rules") or {}).values()))
    rows = []
    for v in VERDICTS:
        n = int(counts.get(v, 0))
        rows.append({"value": v, "word": VERDICT_WORDS[v], "n": n,
                     "share": f"{100.0 * n / total:.1f} %"})
    return rows, waived


def _binding_rows(sweep: dict) -> list[dict]:
    """Each rule that binds somewhere: the points it binds, its least margin there and the
    values of that point."""
    acc: dict[str, dict] = {}
    for p in sweep["points"]:
        rid = p.get("binding")
        if not rid:
            continue
        row = acc.setdefault(rid, {"rule": rid, "points": 0, "least": None, "where": {}, "fails": 0})
        row["points"] += 1
        m = p.get("binding_margin")
        if m is not None and (row["least"] is None or m < row["least"]):
            row["least"], row["where"] = m, p.get("values", {})
        if (p.get("rules") or {}).get(rid, {}).get("status") in ("fail", "error", "warn"):
            row["fails"] += 1
    total = len(sweep["points"]) or 1
    units = {a["key"]: a.get("unit") or "" for a in sweep["axes"]}
    out = []
    for row in sorted(acc.values(), key=lambda r: (-r["points"], r["rule"])):
        out.append({"rule": row["rule"], "points": row["points"],
                    "share": f"{100.0 * row['points'] / total:.1f} %",
                    "violated": row["fails"], "least": _num(row["least"], 3),
                    "where": "; ".join(f"{k} = {_num(v)} {units.get(k, '')}".rstrip()
                                       for k, v in row["where"].items())})
    return out


def _problem_rows(sweep: dict) -> list[dict]:
    found: dict[str, int] = {}
    for p in sweep["points"]:
        if p["verdict"] == "invalid":
            found[p.get("problem") or "no reason given"] = found.get(p.get("problem") or "no reason given", 0) + 1
    return [{"problem": k, "n": n} for k, n in sorted(found.items(), key=lambda kv: -kv[1])]


def _interval(r: dict) -> dict:
    return {"p": f"{r['p']:.3f}", "low": f"{r['low']:.3f}", "high": f"{r['high']:.3f}",
            "passes": r["passes"], "n": r["n"]}


def _monte_carlo(sweep: dict) -> dict | None:
    mc = sweep.get("monte_carlo")
    if sweep["kind"] != "monte-carlo" or not mc:
        return None
    prob = mc["pass_probability"]
    rules = sorted(((rid, r) for rid, r in prob.get("rules", {}).items()),
                   key=lambda kv: (kv[1]["p"] if kv[1].get("n") else 2.0, kv[0]))
    return {"samples": mc["samples"], "seed": mc["seed"], "distribution": mc["distribution"],
            "overall": _interval(prob["overall"]),
            "rules": [{"rule": rid, **_interval(r)} for rid, r in rules if r.get("n")],
            "idle": [rid for rid, r in rules if not r.get("n")],
            # a coefficient is null where it is undefined (no sample failed, or every one did)
            "correlation": [{"key": c["key"], "coefficient": "undefined" if c.get("coefficient") is None
                             else f"{c['coefficient']:+.3f}"} for c in mc.get("correlation") or ()]}


def sweep_context(sweep: dict, medium: str = "pdf") -> dict:
    """Plain data for templates/sweep-report.html.j2 (checks the dict first)."""
    check_sweep(sweep)
    counts, waived = _count_rows(sweep)
    nominal = sweep.get("nominal") or {}
    shown, _ = select_cautions(None)
    grid = sweep["kind"] == "grid"
    binding = _binding_rows(sweep)
    units = {a["key"]: a.get("unit") or "" for a in sweep["axes"]}
    return {
        "title": ("Operating-window study" if grid else "Tolerance study (Monte Carlo)"),
        "kind": sweep["kind"], "tool": sweep["tool"], "spec": sweep["spec"],
        "policy": sweep["policy"], "axes": _axis_rows(sweep),
        "shape": " × ".join(str(n) for n in sweep["shape"]), "n_points": len(sweep["points"]),
        "counts": counts, "waived_points": waived,
        "nominal": {"verdict": VERDICT_WORDS.get(nominal.get("verdict"), str(nominal.get("verdict"))),
                    "binding": nominal.get("binding"),
                    "at": "; ".join(f"{k} = {_num(v)} {units.get(k, '')}".rstrip()
                                  for k, v in nominal.get("values", {}).items())},
        "figures": sweep_figures(sweep), "binding": binding[:MAX_ROWS],
        "binding_total": len(binding), "problems": _problem_rows(sweep)[:MAX_ROWS],
        "mc": _monte_carlo(sweep), "cautions": shown, "verdict_words": VERDICT_WORDS,
        "medium": medium, "font_dir": render._font_dir().as_uri() if medium == "pdf" else "",
        "attachment": SWEEP_ATTACHMENT, "max_rows": MAX_ROWS,
        "evaluated_at": str(sweep.get("evaluated_at") or ""),
        "notes": [str(n) for n in sweep.get("notes") or ()],
    }


def render_sweep_html(sweep: dict, medium: str = "pdf") -> str:
    """The study's report as one HTML page (``medium`` as for the review report)."""
    import jinja2

    if medium not in render.MEDIA:
        raise ValueError(f"medium must be one of {render.MEDIA}, not {medium!r}")
    env = jinja2.Environment(
        loader=jinja2.FileSystemLoader(str(render.templates_dir())), autoescape=render._autoescape,
        undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True)
    return env.get_template("sweep-report.html.j2").render(**sweep_context(sweep, medium))


def render_sweep_pdf(sweep: dict) -> bytes:
    """The study's report as PDF/A-3b bytes with the study's JSON attached (identical bytes
    for identical studies)."""
    import weasyprint

    html = render_sweep_html(sweep)
    attachment = weasyprint.Attachment(
        string=jsontext.dumps(sweep), name=SWEEP_ATTACHMENT,
        description=f"sweep results ({SCHEMA} JSON)", created=render._EPOCH,
        modified=render._EPOCH, relationship="Data")
    return render.write_archival_pdf(html, [attachment])
