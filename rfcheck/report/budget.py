"""The power budget of each feed in its two states, from what the run recorded (no physics).

Running state: the forward power meets the feed's windows first (each reflects and absorbs a
share of what reaches it, its worst case over the band and the layers' spreads, from the
cached window analysis the window rules read), what passes is launched into the plasma and
splits into its parts (the characteristic waves, at the worst split the load finding names);
each part is returned towards the launcher, absorbed in the plasma or leaves through the far
end, as the load.plasma-reflection finding recorded it (its ``details``, also in the JSON).
Ignition state: no plasma; the unlit cavity returns P |Γ_cold|² (declared, else the worst case
|Γ_cold| = 1) and the rest stays in the cavity (walls, windows, anything else in it).

The rows add up to the forward power by construction of the accounting: each stage takes its
share of what reaches it. What they add is power, each stage at its own worst point; the
verdict on the reflected power (load.reflected-power) bounds the amplitudes instead,
(|Γ_w| + |Γ_p|)², which is never less. The budget is an account for the reviewer, not a
second verdict.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = ["BudgetRow", "Budget", "power_budgets", "budget_rows"]

RUNNING = "running"
IGNITION = "ignition"


@dataclass(frozen=True)
class BudgetRow:
    """One line of a budget: where a share of the forward power goes.

    kind: "reflected", "absorbed", "transmitted" (an end of the budget) or "through" (what
    passes a stage, for reading only, not an end); fraction: of the forward power."""

    stage: str
    what: str
    kind: str
    fraction: float
    note: str = ""


@dataclass
class Budget:
    feed: str
    state: str
    forward: float  # W, peak forward power
    duty_cycle: float
    rows: list[BudgetRow] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    missing: str = ""  # why there is no budget for this state (rows empty)

    def total(self, kind: str) -> float:
        """Sum of the end rows of one kind, as a fraction of the forward power."""
        return sum(r.fraction for r in self.rows if r.kind == kind)

    @property
    def ends(self) -> dict[str, float]:
        return {k: self.total(k) for k in ("reflected", "absorbed", "transmitted")}


def _finding(run, rule: str, subject: str):
    return next((f for f in run.findings if f.rule == rule and f.subject == subject), None)


def _windows(run, feed) -> list[tuple[str, float, float, str, str]]:
    """(window id, worst |Γ|², worst absorbed fraction, reflection note, absorption note) of
    each window on the feed,
    from the run's cached window analysis (the one the window rules and figure read)."""
    from rfcheck.analysis.window import window_analysis

    out = []
    for w in run.model.windows:
        if w.feed != feed.id:
            continue
        try:
            a = window_analysis(run.context, w)
        except ValueError as exc:
            out.append((w.id, float("nan"), float("nan"), str(exc), ""))
            continue
        g, f_g, _ = a.worst_gamma
        ab, f_a, _ = a.worst_absorptance
        out.append((w.id, float(g) ** 2, float(ab),
                    f"worst |Γ| {float(g):.3g} at {f_g / 1e9:.5g} GHz over the band and the "
                    "layers' spreads",
                    f"worst at {f_a / 1e9:.5g} GHz, every tan δ at the top of its range"))
    return out


def _running(run, feed) -> Budget:
    b = Budget(feed.id, RUNNING, feed.power, feed.duty_cycle)
    f = _finding(run, "load.plasma-reflection", f"feed {feed.id}, {RUNNING}")
    parts = (f.details or {}).get("parts") if f is not None else None
    if not parts:
        b.missing = (f.message if f is not None and f.status.value == "not-applicable"
                     else "load.plasma-reflection gave no split of the launched power "
                          "(not selected, or not evaluated)")
        return b
    passing = 1.0
    for wid, refl, absd, note, a_note in _windows(run, feed):
        if not (refl == refl and absd == absd):  # NaN: the line does not carry the band
            b.missing = f"window {wid}: {note or 'reflection undefined over the band'}"
            b.rows.clear()
            return b
        b.rows.append(BudgetRow(f"window {wid}", "reflected towards the generator", "reflected",
                                passing * refl, note))
        b.rows.append(BudgetRow(f"window {wid}", "absorbed in the window", "absorbed",
                                passing * absd, a_note))
        passing *= 1.0 - refl - absd
    b.rows.append(BudgetRow("launcher", "launched into the plasma", "through", passing))
    for p in parts:
        share = float(p["fraction"])
        if share <= 0:
            continue
        stage = f"{p['part']} part ({100 * share:.3g} % of the launched power)"
        end = "far end" + ("" if p.get("far_end_declared") else " (not declared)")
        b.rows.append(BudgetRow(stage, "returned towards the launcher", "reflected",
                                passing * share * float(p["returned"])))
        b.rows.append(BudgetRow(stage, "absorbed in the plasma", "absorbed",
                                passing * share * float(p["absorbed"])))
        b.rows.append(BudgetRow(stage, f"leaves through the {end}, {p.get('far_end', '?')}",
                                "transmitted", passing * share * float(p["escaped"])))
    b.notes.append((f.details or {}).get("polarisation", ""))
    return b


def _ignition(run, feed) -> Budget:
    b = Budget(feed.id, IGNITION, feed.power, feed.duty_cycle)
    f = _finding(run, "load.ignition-reflection", f"feed {feed.id}, {IGNITION}")
    details = (f.details or {}) if f is not None else {}
    gamma = details.get("gamma_cold")
    if gamma is None:
        from rfcheck.analysis.load import cold_gamma

        gamma, _ = cold_gamma(feed)
    declared = details.get("gamma_cold_declared", feed.cold_cavity_gamma is not None)
    g2 = float(gamma) ** 2
    how = "declared" if declared else "not declared: the worst case, 1"
    b.rows.append(BudgetRow("unlit cavity", "reflected towards the generator", "reflected", g2,
                            f"|Γ_cold| = {float(gamma):.3g} ({how})"))
    b.rows.append(BudgetRow("unlit cavity", "stays in the cavity (walls, windows, load)",
                            "absorbed", 1.0 - g2))
    return b


def power_budgets(run) -> list[Budget]:
    """Every feed's budget, running then ignition (empty for a run without a model)."""
    m = run.model
    if m is None or run.context is None:
        return []
    out = []
    for feed in m.feeds:
        out.append(_running(run, feed))
        out.append(_ignition(run, feed))
    return out


def _pct(x: float) -> str:
    """Every share in one unit, percent (3 significant digits; tiny ones in exponent form)."""
    v = 100.0 * x
    if v == 0:
        return "0 %"
    return f"{v:.3g} %"


def _watts(x: float) -> str:
    from rfcheck.units import format_si

    return "0 W" if x == 0 else format_si(x, "W")


def budget_rows(run) -> list[dict]:
    """The budgets as plain data for the report template."""
    out = []
    for b in power_budgets(run):
        rows = [{"stage": r.stage, "what": r.what, "kind": r.kind, "share": _pct(r.fraction),
                 "peak": _watts(b.forward * r.fraction),
                 "average": _watts(b.forward * b.duty_cycle * r.fraction), "note": r.note}
                for r in b.rows]
        totals = [{"what": {"reflected": "reflected towards the generator (powers added)",
                            "absorbed": "absorbed (windows, plasma, cavity)",
                            "transmitted": "leaves through the far end"}[k],
                   "share": _pct(v), "peak": _watts(b.forward * v),
                   "average": _watts(b.forward * b.duty_cycle * v)}
                  for k, v in b.ends.items() if b.rows]
        out.append({"feed": b.feed, "state": b.state, "forward": _watts(b.forward),
                    "average": _watts(b.forward * b.duty_cycle),
                    "duty": f"{100 * b.duty_cycle:.3g} %", "rows": rows, "totals": totals,
                    "sum": _pct(sum(b.ends.values())) if b.rows else "",
                    "notes": [n for n in b.notes if n], "missing": b.missing})
    return out
