"""Which cautions a report shows, and the source-specific lines they carry.

Selection only (no physics): the conditions read the model and the run's findings. Every
caution not shown is returned with the reason, so the report says what it left out and why.
The standing scope statement and the RF-exposure and high-voltage cautions are always shown.
"""

from __future__ import annotations

from rfcheck import data
from rfcheck.model import Coil, SourceModel, UniformField

__all__ = ["select_cautions", "HOT_ELECTRON_TE", "CRYOGENIC_CURRENT_DENSITY"]

#: a declared electron temperature from which hot (keV) electrons are plain, eV
HOT_ELECTRON_TE = 1000.0
#: winding current density above which a coil is taken as superconducting, A/m²: 30 A/mm²
#: averaged over the winding section, beyond what resistive water-cooled windings carry
#: (common practice: about 5-20 A/mm²)
CRYOGENIC_CURRENT_DENSITY = 30e6
_ECR = ("ecr", "ecr-harmonic-2", "uhr")


def _hot_electrons(model: SourceModel) -> tuple[bool, str]:
    ecr = [f for f in model.feeds if f.absorption in _ECR]
    te = model.plasma.electron_temperature.max
    trap = model.magnet.trap
    if not ecr:
        return False, "no feed heats at the electron cyclotron or upper-hybrid resonance"
    if trap in ("mirror", "minimum-b") or te >= HOT_ELECTRON_TE:
        freqs = ", ".join(f"{f.frequency / 1e9:.4g} GHz" for f in ecr)
        return True, (f"This source: ECR heating at {freqs} in a {trap} trap with electron "
                      f"temperatures up to {te:g} eV declared: keV electrons are plausible.")
    return False, (f"ECR heating without a confining trap (trap '{trap}') and electron "
                   f"temperatures up to {te:g} eV declared: keV electrons are not expected; "
                   "show it again if X-rays are measured")


def _beryllia(model: SourceModel) -> tuple[bool, str]:
    from rfcheck.analysis.window_material import resolve_material

    toxic = []
    for w in model.windows:
        for layer in w.layers:
            try:
                mat = resolve_material(model, layer.material)
            except ValueError:
                continue
            if "beryl" in layer.material.lower() or any("toxic" in c for c in mat.cautions):
                toxic.append(f"{layer.material} in window {w.id}")
    if toxic:
        return True, f"This source: {', '.join(toxic)}."
    return False, "no window layer of beryllia or another material flagged toxic"


def _cryogens(model: SourceModel) -> tuple[bool, str]:
    declared = model.exposure.cryogenic_magnet if model.exposure is not None else None
    if declared is not None:
        return declared, ("This source: superconducting coils (declared)." if declared else
                          "the magnet is declared not cryogenic")
    dense = []
    for s in model.magnet.sources:
        if isinstance(s, Coil) and s.length > 0 and s.outer_radius > s.inner_radius:
            j = abs(s.turns * s.current) / ((s.outer_radius - s.inner_radius) * s.length)
            if j > CRYOGENIC_CURRENT_DENSITY:
                dense.append(f"{s.id} {j / 1e6:.3g} A/mm²")
    if dense:
        return True, ("This source: coils above 30 A/mm² over the winding section are taken as "
                      f"superconducting ({', '.join(dense)}); declare cryogenic_magnet in "
                      "[exposure] to confirm.")
    return False, ("no coil above 30 A/mm² over its winding section (inferred resistive or "
                   "permanent magnets; declare cryogenic_magnet in [exposure] otherwise)")


def _magnet(model: SourceModel, findings) -> tuple[bool, str]:
    if not model.magnet.sources:
        return False, "no magnet"
    lines = [f for f in findings if f.rule == "exposure.static-field-line" and f.details]
    if not lines:
        if any(isinstance(s, UniformField) for s in model.magnet.sources):
            return True, "This source's magnet is modelled as a uniform field: its fringe is not known."
        return True, ""
    words = []
    for f in lines:
        d = f.details
        words.append(f"{d['level'] * 1e3:.3g} mT at z = {d['z_low']:.3g} m and {d['z_high']:.3g} m "
                     f"on the axis and r = {d['radius']:.3g} m radially")
    return True, ("This source (worst current scale, no iron modelled): |B| falls to "
                  + "; ".join(words) + ". Mark these lines; see the fringe-field figure.")


def select_cautions(model: SourceModel | None, findings=()) -> tuple[list[dict], list[dict]]:
    """(shown, left out): shown as {id, title, text, note}, left out as {id, title, reason}."""
    shown, omitted = [], []
    for c in data.load("cautions.toml")["caution"]:
        when = c.get("when", "always")
        show, note = True, ""
        if model is not None and when != "always":
            if when == "hot-electrons":
                show, note = _hot_electrons(model)
            elif when == "beryllia":
                show, note = _beryllia(model)
            elif when == "cryogens":
                show, note = _cryogens(model)
            elif when == "magnet":
                show, note = _magnet(model, findings)
            elif when == "windows":
                show = bool(model.windows)
                note = "" if show else "no windows declared"
        if show:
            shown.append({"id": c["id"], "title": c["title"], "text": c["text"], "note": note})
        else:
            omitted.append({"id": c["id"], "title": c["title"], "reason": note})
    return shown, omitted
