"""Archived reports: read the files a PDF report carries, and prove the report from them.

An rfcheck PDF attaches every input file byte for byte (the specification, the user policy,
measured field tables, a site exposure table), the shipped default policy and the results
JSON, and prints each input's SHA-256 (its first digits on the cover, the whole digest in
Appendix D). :func:`read_report` takes those attachments out (pypdf, imported only here);
:func:`materialise` lays them out in a folder as the run read them (measured files at the
path the spec names, relative to it); :func:`verify` checks every fingerprint and evaluates
the attachments again, with the evaluation instant the report recorded, so a waiver that
was in force then is in force in the re-run.

Outcomes: ``match`` (exit 0), ``differ`` (exit 1, each difference named), or
:class:`ArchiveError` (exit 2: not an rfcheck report, or unreadable).
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import math
import os
import re
import stat
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath

#: largest PDF read (an rfcheck report is a few MiB; a measured map attached adds at most 32 MiB)
MAX_REPORT_BYTES = 128 * 1024 ** 2
#: relative tolerance on the measured values and margins of a re-run (floating-point noise
#: across NumPy and BLAS builds reaches the last digits only; tests/test_approved.py uses the same)
RERUN_RTOL = 1e-6


class ArchiveError(Exception):
    """The file is not an rfcheck report, or cannot be read as one (exit code 2)."""


@dataclass(frozen=True)
class Archive:
    """What an archived report carries."""

    path: Path
    attachments: dict[str, bytes]
    results: dict
    #: text of the report's first pages (the cover with its fingerprints)
    cover_text: str
    #: the whole digests printed in Appendix D (lower-case hex), in page order
    printed_digests: tuple[str, ...] = ()

    @property
    def inputs(self) -> list[dict]:
        return list(self.results.get("inputs") or [])


def _read_bytes(path: Path) -> bytes:
    from rfcheck.inputfiles import file_kind

    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise ArchiveError(f"{path}: no such file") from None
    except OSError as exc:
        raise ArchiveError(f"{path}: cannot read the report ({exc.strerror})") from None
    if not stat.S_ISREG(st.st_mode):
        raise ArchiveError(f"{path}: the report path is {file_kind(st.st_mode)}; expected a PDF file")
    if st.st_size > MAX_REPORT_BYTES:
        raise ArchiveError(f"{path}: the report is {st.st_size} bytes; at most "
                           f"{MAX_REPORT_BYTES} are read")
    try:
        fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK)
        with os.fdopen(fd, "rb") as fh:
            if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):
                raise ArchiveError(f"{path}: the report path is not a regular file")
            data = fh.read(MAX_REPORT_BYTES + 1)
    except OSError as exc:
        raise ArchiveError(f"{path}: cannot read the report ({exc.strerror})") from None
    if len(data) > MAX_REPORT_BYTES:
        raise ArchiveError(f"{path}: the report is larger than {MAX_REPORT_BYTES} bytes")
    return data


def is_pdf(path: Path) -> bool:
    """Whether `path` is a regular file that begins like a PDF (``%PDF-``)."""
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):
            return False
        fd = os.open(path, os.O_RDONLY | os.O_NONBLOCK)
        with os.fdopen(fd, "rb") as fh:
            return fh.read(5) == b"%PDF-"
    except OSError:
        return False


#: a full digest as Appendix D prints it ("SHA-256 <64 hex>"; a line break may fall inside)
_HEX64 = re.compile(r"SHA-256\s+((?:[0-9a-f]\s*){64})")


def read_report(path: str | Path) -> Archive:
    """The attachments, results and cover text of the rfcheck report at `path`.

    Raises :class:`ArchiveError` when the file is not a PDF, cannot be parsed, or carries no
    rfcheck results attachment.
    """
    import io
    import logging

    path = Path(path)
    data = _read_bytes(path)
    if not data.startswith(b"%PDF-"):
        raise ArchiveError(f"{path}: not a PDF file (it does not begin with %PDF-)")
    try:
        import pypdf
    except ImportError:  # pragma: no cover - pypdf is installed with rfcheck's extras
        raise ArchiveError("reading an archived report needs pypdf (pip install pypdf)") from None
    from rfcheck.report.context import RESULTS_ATTACHMENT

    logging.getLogger("pypdf").setLevel(logging.ERROR)
    try:
        reader = pypdf.PdfReader(io.BytesIO(data), strict=False)
        raw = reader.attachments
        attachments = {}
        for name in raw:
            items = raw[name]
            attachments[name] = bytes(items[0]) if items else b""
        pages = reader.pages
        cover = "\n".join((pages[i].extract_text() or "") for i in range(min(3, len(pages))))
        # the full digests: Appendix D near the end; read from the back until found
        digests: list[str] = []
        seen = False
        for i in range(len(pages) - 1, max(-1, len(pages) - 6), -1):
            text = pages[i].extract_text() or ""
            digests = [re.sub(r"\s+", "", h) for h in _HEX64.findall(text)] + digests
            if "Appendix D" in text:
                seen = True
                break
        if not seen:
            digests = []
    except ArchiveError:
        raise
    except Exception as exc:  # noqa: BLE001 - any parse failure of a foreign file is bad input
        raise ArchiveError(f"{path}: the PDF cannot be read ({type(exc).__name__})") from None
    if RESULTS_ATTACHMENT not in attachments:
        raise ArchiveError(f"{path}: not an rfcheck report (no {RESULTS_ATTACHMENT} attached)")
    try:
        results = json.loads(attachments[RESULTS_ATTACHMENT].decode("utf-8"))
    except (UnicodeDecodeError, ValueError):
        raise ArchiveError(f"{path}: the attached {RESULTS_ATTACHMENT} is not JSON") from None
    if not isinstance(results, dict) or results.get("schema") != "rfcheck-run/1":
        raise ArchiveError(f"{path}: the attached {RESULTS_ATTACHMENT} is not rfcheck-run/1 "
                           "results")
    if not isinstance(results.get("inputs"), list) or not all(
            isinstance(i, dict) and {"role", "file", "sha256"} <= set(i) for i in results["inputs"]):
        raise ArchiveError(f"{path}: the attached results list no input files (key 'inputs')")
    return Archive(path, attachments, results, cover, tuple(digests))


def attachment_names(results: dict) -> tuple[list[tuple[dict, str]], str | None]:
    """(each input entry of `results` with its attachment name, the default policy's name):
    the names the renderer gave them (rfcheck.report.context.input_attachments)."""
    from types import SimpleNamespace

    from rfcheck.report.context import input_attachments
    from rfcheck.run import InputRecord

    records = tuple(InputRecord(str(i["role"]), str(i["file"]), b"", str(i["sha256"]))
                    for i in results.get("inputs") or [])
    fake = SimpleNamespace(inputs=records, policy_texts=(("default", ""),),
                           spec_file="", spec_text="")
    pairs, default = input_attachments(fake)
    entries = list(results.get("inputs") or [])
    return [(entries[k], name) for k, (_, name) in enumerate(pairs)], default


@dataclass(frozen=True)
class Laid:
    """An archive's inputs written to a folder: the spec's path and the user policy's (or None)."""

    spec: Path
    policy: Path | None


def materialise(archive: Archive, folder: Path) -> Laid:
    """Write the archive's input files into `folder` where the spec expects them.

    The spec goes to a sub-folder deep enough that every relative measured-file path it
    names (``../maps/b.csv`` included) stays inside `folder`; the site table beside the spec.
    Raises :class:`ArchiveError` when an input is not attached or names an absolute path.
    """
    pairs, _ = attachment_names(archive.results)
    specs = [(e, n) for e, n in pairs if e["role"] == "specification"]
    if len(specs) != 1:
        raise ArchiveError(f"{archive.path}: the results list {len(specs)} specifications; "
                           "expected one")
    for e, name in pairs:
        if name not in archive.attachments:
            raise ArchiveError(f"{archive.path}: the {e['role']} {e['file']} is listed in the "
                               f"results but not attached (expected attachment {name})")
    ups = 0
    for e, _ in pairs:
        if e["role"] in ("measured axis table", "measured field map"):
            p = PurePosixPath(str(e["file"]).replace("\\", "/"))
            if p.is_absolute():
                raise ArchiveError(f"{archive.path}: the {e['role']} {e['file']} is named by an "
                                   "absolute path; it cannot be laid out beside the spec")
            ups = max(ups, sum(1 for part in p.parts if part == ".."))
    for e, _ in pairs:
        name = PurePosixPath(str(e["file"]).replace("\\", "/")).name
        if name in ("", ".", "..") or len(name) > 255 or "\x00" in name:
            raise ArchiveError(f"{archive.path}: the results name a {e['role']} file that "
                               "cannot be laid out (an empty, '.' or '..' name)")
    base = folder.joinpath(*[f"d{k}" for k in range(ups)]) if ups else folder
    base.mkdir(parents=True, exist_ok=True)
    spec_entry, spec_name = specs[0]
    spec_path = base / PurePosixPath(str(spec_entry["file"])).name
    policy_path = None
    for e, name in pairs:
        data = archive.attachments[name]
        role = e["role"]
        if role == "specification":
            target = spec_path
        elif role == "policy":
            # its own name (the run records it), in a folder of its own
            target = folder / "policy" / PurePosixPath(str(e["file"])).name
            policy_path = target
        elif role == "site exposure table":
            target = base / PurePosixPath(str(e["file"])).name
        else:
            target = (base / PurePosixPath(str(e["file"]).replace("\\", "/"))).resolve()
            if folder.resolve() not in target.parents:
                raise ArchiveError(f"{archive.path}: the {role} {e['file']} would leave the "
                                   "folder it is laid out in")
        try:
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        except OSError as exc:
            raise ArchiveError(f"{archive.path}: the {role} {str(e['file'])[:80]} cannot be "
                               f"laid out ({exc.strerror or type(exc).__name__})") from None
    return Laid(spec_path, policy_path)


# --------------------------------------------------------------------------- verification


@dataclass
class Report:
    """What `verify` found: every check with its outcome, and the differences."""

    path: Path
    checks: list[str] = field(default_factory=list)
    differences: list[str] = field(default_factory=list)

    @property
    def matches(self) -> bool:
        return not self.differences

    def lines(self) -> list[str]:
        out = [f"ok: {c}" for c in self.checks] + [f"DIFFERS: {d}" for d in self.differences]
        out.append(f"{self.path}: " + ("the report matches its attachments and a re-run"
                                       if self.matches else
                                       f"{len(self.differences)} difference"
                                       f"{'s' if len(self.differences) != 1 else ''}"))
        return out


def recorded_instant(results: dict) -> dt.datetime | None:
    """The evaluation instant the results recorded (aware), or None for older reports."""
    text = results.get("evaluated_at")
    if not isinstance(text, str):
        return None
    try:
        at = dt.datetime.fromisoformat(text)
    except ValueError:
        return None
    return at if at.tzinfo is not None else at.astimezone()


def _close(a, b, rtol: float = RERUN_RTOL) -> bool:
    if a is None or b is None:
        return a is b
    if isinstance(a, (int, float)) and isinstance(b, (int, float)):
        return math.isclose(a, b, rel_tol=rtol, abs_tol=0.0) or a == b
    return a == b


def _g(x) -> str:
    return "none" if x is None else f"{x:.10g}" if isinstance(x, float) else str(x)


def _value(q):
    return q.get("value") if isinstance(q, dict) else None


def finding_differences(old: list[dict], new: list[dict]) -> list[str]:
    """Each recorded finding that the re-run does not give back, named by rule and subject:
    status, message, measured value, limit and margin (numbers to RERUN_RTOL)."""
    def key(f):
        return (f.get("rule"), f.get("subject"))

    out = []
    new_by = {}
    for f in new:
        new_by.setdefault(key(f), []).append(f)
    old_by = {}
    for f in old:
        old_by.setdefault(key(f), []).append(f)
    for k, fs in old_by.items():
        got = new_by.get(k, [])
        name = f"{k[0]} ({k[1]})"
        if not got:
            out.append(f"{name}: recorded {str(fs[0].get('status')).upper()}, the re-run gives "
                       "no such finding")
            continue
        for a, b in zip(fs, got):
            what = []
            if a.get("status") != b.get("status"):
                what.append(f"status {str(a.get('status')).upper()} recorded, "
                            f"{str(b.get('status')).upper()} now")
            for q in ("measured", "limit", "margin"):
                x, y = _value(a.get(q)), _value(b.get(q))
                if not _close(x, y):
                    unit = (a.get(q) or b.get(q) or {}).get("unit", "")
                    unit = "" if unit == "1" else f" {unit}"
                    what.append(f"{q} {_g(x)}{unit} recorded, {_g(y)}{unit} now")
            if a.get("message") != b.get("message") and not what:
                what.append("message differs (recorded: " + str(a.get("message"))[:160]
                            + " / now: " + str(b.get("message"))[:160] + ")")
            if what:
                out.append(f"{name}: " + "; ".join(what))
    for k, fs in new_by.items():
        if k not in old_by:
            out.append(f"{k[0]} ({k[1]}): not recorded, the re-run gives "
                       f"{str(fs[0].get('status')).upper()}")
    return out


def verify(path: str | Path) -> Report:
    """Check the report at `path` against its own attachments and a re-run of them."""
    import tempfile

    from rfcheck import __version__
    from rfcheck.report.context import HASH_PREFIX
    from rfcheck.rules.policy import _default_text, load_policy
    from rfcheck.run import RULESET_VERSION, run
    from rfcheck.spec import InputError, load_spec

    archive = read_report(path)
    rep = Report(Path(path))
    results = archive.results
    cover = re.sub(r"\s+", "", archive.cover_text)
    pairs, default_name = attachment_names(results)
    # 1. fingerprints: the cover's, the results', the attached bytes'
    for entry, name in pairs:
        label = f"{entry['role']} {entry['file']} (attachment {name})"
        data = archive.attachments.get(name)
        recorded = str(entry["sha256"]).lower()
        if data is None:
            rep.differences.append(f"{label}: listed in the results but not attached")
            continue
        actual = hashlib.sha256(data).hexdigest()
        on_cover = recorded[:HASH_PREFIX] in cover
        if not on_cover:
            rep.differences.append(f"{label}: the results' SHA-256 {recorded[:HASH_PREFIX]}… "
                                   "is not the one printed on the cover")
        if actual != recorded:
            printed = "the cover's and the results' " if on_cover else "the results' "
            rep.differences.append(
                f"{label}: the attached file's SHA-256 is {actual[:HASH_PREFIX]}…, "
                f"{printed}{recorded[:HASH_PREFIX]}…: the attachment is not the file that was "
                f"checked ({len(data)} bytes attached, {entry.get('bytes', '?')} recorded)")
        elif on_cover:
            rep.checks.append(f"{label}: SHA-256 {actual[:HASH_PREFIX]}… as on the cover")
        if archive.printed_digests and actual == recorded and actual not in archive.printed_digests:
            rep.differences.append(f"{label}: its full SHA-256 is not printed in Appendix D")
    # 2. the rule set and tool that made the report
    tool = results.get("tool") or {}
    claimed = str(tool.get("ruleset", "?"))
    if not re.search(rf"ruleset{re.escape(claimed)}(?![0-9.])", cover, re.I):
        rep.differences.append(f"the results claim rule set {claimed}; the cover does not state it")
    if claimed != RULESET_VERSION:
        rep.differences.append(f"the report was made with rule set {claimed}; the installed "
                               f"rfcheck {__version__} has rule set {RULESET_VERSION}: the "
                               "re-run below uses the installed rules, and every finding that "
                               "changed is listed")
    else:
        rep.checks.append(f"rule set {claimed}, as installed")
    if default_name is not None and default_name in archive.attachments:
        if archive.attachments[default_name].decode("utf-8", "replace") != _default_text():
            rep.differences.append(f"the attached default policy ({default_name}) differs "
                                   "from the installed defaults: the re-run uses the installed "
                                   "defaults")
        else:
            rep.checks.append("the attached default policy equals the installed defaults")
    # 3. re-run the attachments at the recorded instant
    at = recorded_instant(results)
    if at is None:
        rep.checks.append("no evaluation instant recorded (an older report): waivers are "
                          "evaluated now")
    with tempfile.TemporaryDirectory(prefix="rfcheck-verify-") as tmp:
        try:
            laid = materialise(archive, Path(tmp))
        except ArchiveError as exc:  # an rfcheck report whose attachments cannot be re-run
            rep.differences.append(f"the attachments cannot be re-run: {exc}")
            return rep
        try:
            new = run(load_spec(laid.spec), load_policy(laid.policy), evaluated_at=at)
        except InputError as exc:
            rep.differences.append("the attached inputs no longer load: "
                                   + "; ".join(str(p) for p in exc.problems)[:400])
            return rep
    fresh = new.to_json()
    diffs = finding_differences(results.get("findings") or [], fresh["findings"])
    rep.differences += diffs
    if results.get("verdict") != fresh["verdict"]:
        rep.differences.append(f"verdict {str(results.get('verdict')).upper()} recorded, "
                               f"{fresh['verdict'].upper()} on re-run")
    if not diffs:
        n = len(fresh["findings"])
        from rfcheck.views import verdict_word

        rep.checks.append(f"re-run at {at.isoformat() if at else 'now'}: all {n} findings and "
                          f"the verdict {verdict_word(new)} as recorded")
    return rep


__all__ = ["Archive", "ArchiveError", "Laid", "Report", "attachment_names", "finding_differences",
           "is_pdf", "materialise", "read_report", "recorded_instant", "verify"]
