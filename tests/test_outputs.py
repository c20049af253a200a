"""Output targets, demo overwrite protection, terminal escaping, warnings and commit under locks."""

import os
import signal
import subprocess
import sys
import time
import types
import warnings

import pytest

from rfcheck import outputs
from rfcheck.cli import _exit_for, main
from rfcheck.findings import Status

from conftest import DEMO


def run_cli(args, capsys):
    code = main([str(a) for a in args])
    out = capsys.readouterr()
    return code, out.out, out.err


def _evaluation_must_not_run(monkeypatch):
    import rfcheck.cli as cli

    def boom(*a, **k):
        raise AssertionError("evaluated although the outputs were refused")

    monkeypatch.setattr(cli, "_evaluate", boom)


def test_symlink_target_refused_before_evaluating(tmp_path, capsys, monkeypatch):
    real = tmp_path / "real.json"
    real.write_text("keep")
    link = tmp_path / "link.json"
    link.symlink_to(real)
    _evaluation_must_not_run(monkeypatch)
    code, _, err = run_cli(["check", DEMO, "--json", link], capsys)
    assert code == 2
    assert "--json" in err and str(link) in err and "symbolic link" in err
    assert link.is_symlink() and real.read_text() == "keep"


def test_fifo_target_refused(tmp_path, capsys, monkeypatch):
    fifo = tmp_path / "pipe.pdf"
    os.mkfifo(fifo)
    _evaluation_must_not_run(monkeypatch)
    code, _, err = run_cli(["check", DEMO, "--pdf", fifo], capsys)
    assert code == 2 and "--pdf" in err and "FIFO" in err
    assert os.path.exists(fifo) and not fifo.is_file()


@pytest.mark.parametrize("kind", ["same", "dotted", "hardlink"])
def test_identical_outputs_refused(tmp_path, capsys, monkeypatch, kind):
    a = tmp_path / "out.json"
    if kind == "same":
        b = a
    elif kind == "dotted":
        (tmp_path / "sub").mkdir()
        b = tmp_path / "sub" / ".." / "out.json"
    else:
        a.write_text("old")
        b = tmp_path / "other.pdf"
        os.link(a, b)
    _evaluation_must_not_run(monkeypatch)
    code, _, err = run_cli(["check", DEMO, "--json", a, "--pdf", b], capsys)
    assert code == 2 and "same file" in err
    if kind == "hardlink":
        assert a.read_text() == "old"
    else:
        assert not a.exists()


def test_unwritable_folder_refused_before_evaluating(tmp_path, capsys, monkeypatch):
    good, bad = tmp_path / "good", tmp_path / "bad"
    good.mkdir()
    bad.mkdir()
    real_mkstemp = outputs.tempfile.mkstemp

    def mkstemp(*a, dir=None, **k):
        if os.path.realpath(dir) == os.path.realpath(bad):
            raise PermissionError(13, "Permission denied")
        return real_mkstemp(*a, dir=dir, **k)

    monkeypatch.setattr(outputs.tempfile, "mkstemp", mkstemp)
    _evaluation_must_not_run(monkeypatch)
    code, _, err = run_cli(["check", DEMO, "--json", good / "r.json", "--pdf", bad / "r.pdf"],
                           capsys)
    assert code == 2 and "--pdf" in err and "Permission denied" in err
    assert os.listdir(good) == [] and os.listdir(bad) == []


def test_partial_commit_names_written_and_unwritten(tmp_path, monkeypatch):
    a, b = tmp_path / "a.json", tmp_path / "b.pdf"
    b.write_bytes(b"old pdf")
    real_replace = os.replace

    def replace(src, dst):
        if str(dst) == str(b):
            raise OSError(28, "No space left on device")
        return real_replace(src, dst)

    monkeypatch.setattr(outputs.os, "replace", replace)
    with pytest.raises(outputs.UsageProblem) as info:
        outputs.commit([("--json", a, b"new json"), ("--pdf", b, b"new pdf")])
    msg = str(info.value)
    assert f"Written: {a}" in msg and f"Not written: {b}" in msg
    assert a.read_bytes() == b"new json" and b.read_bytes() == b"old pdf"
    assert not [n for n in os.listdir(tmp_path) if n.endswith(".part")]


def test_commit_keeps_mode_and_leaves_only_lock_files(tmp_path):
    a = tmp_path / "a.json"
    a.write_bytes(b"old")
    os.chmod(a, 0o640)
    outputs.commit([("--json", a, b"new")])
    assert a.read_bytes() == b"new" and (a.stat().st_mode & 0o777) == 0o640
    assert sorted(os.listdir(tmp_path)) == [".a.json.lock", "a.json"]


def test_demo_never_overwrites_without_force(tmp_path, capsys, monkeypatch):
    out = tmp_path / "d"
    out.mkdir()
    spec = out / "bench-ecr-reactor.toml"
    spec.write_text("# my edits\n")
    _evaluation_must_not_run(monkeypatch)
    code, _, err = run_cli(["demo", "--out", out], capsys)
    assert code == 2 and str(spec) in err and "--force" in err
    assert spec.read_text() == "# my edits\n" and os.listdir(out) == ["bench-ecr-reactor.toml"]


def test_demo_force_overwrites(tmp_path, capsys):
    out = tmp_path / "d"
    out.mkdir()
    spec = out / "bench-ecr-reactor.toml"
    spec.write_text("# my edits\n")
    code, _, _ = run_cli(["demo", "--out", out, "--force"], capsys)
    assert code in (0, 1)
    assert spec.read_bytes() == DEMO.read_bytes()
    assert (out / "bench-ecr-reactor.pdf").read_bytes()[:5] == b"%PDF-"


def _fake_run(name, verdict="warn", **extra):
    f = types.SimpleNamespace(rule="r.one", status=Status.WARN, subject="feed \x1b[2J",
                              message="msg \x07 end")
    return types.SimpleNamespace(spec_name=name, spec_revision=None, findings=[f],
                                 counts=lambda: {"warn": 1}, verdict=verdict, **extra)


def test_text_table_escapes_terminal_sequences():
    from rfcheck.views import text_table

    text = text_table(_fake_run("src\x1b]0;title\x07\u202e"), colour=False)
    assert "\x1b" not in text and "\x07" not in text and "\u202e" not in text
    assert "\\x1b]0;title\\x07\\u202e" in text and "\\x1b[2J" in text


def test_input_error_messages_are_escaped(tmp_path, capsys):
    bad = tmp_path / "bad\x1b[31m.toml"
    bad.write_text("name = 'x'\n[broken\n")
    code, _, err = run_cli(["check", bad], capsys)
    assert code == 2 and "\x1b" not in err and "\\x1b[31m" in err


def test_exit_for_uses_exit_fails_and_strict():
    assert _exit_for(_fake_run("s", "not-evaluated", exit_fails=True), False) == 1
    assert _exit_for(_fake_run("s", "pass"), False) == 0
    assert _exit_for(_fake_run("s", "fail"), False) == 1
    assert _exit_for(_fake_run("s", "warn"), False) == 0
    assert _exit_for(_fake_run("s", "warn"), True) == 1


def test_warnings_never_reach_stderr(capsys, monkeypatch):
    import numpy as np

    import rfcheck.cli as cli

    def noisy(*a, **k):
        np.float64(1.0) / np.float64(0.0)
        warnings.warn("internal", RuntimeWarning)
        raise SystemExit(0)

    monkeypatch.setattr(cli, "_evaluate", noisy)
    monkeypatch.delenv("RFCHECK_DEBUG", raising=False)
    with np.errstate(divide="warn"):
        code, _, err = run_cli(["check", DEMO], capsys)
    assert code == 0 and err == "" and cli.last_warning_count == 2
    monkeypatch.setenv("RFCHECK_DEBUG", "1")
    with np.errstate(divide="warn"):
        code, _, err = run_cli(["check", DEMO], capsys)
    assert err.count("\n") == 1 and "2 internal numerical warning" in err


_WRITER = """
import sys
from pathlib import Path
from rfcheck.outputs import commit
tag = sys.argv[3].encode()
commit([("--json", Path(sys.argv[1]), tag * 200000), ("--pdf", Path(sys.argv[2]), tag * 300000)])
"""


def _start_writer(a, b, tag, pause):
    env = dict(os.environ, RFCHECK_TEST_PAUSE_BEFORE_COMMIT=str(pause))
    return subprocess.Popen([sys.executable, "-c", _WRITER, str(a), str(b), tag], env=env)


@pytest.mark.parametrize("delay", [0.0, 0.05, 0.15, 0.4])
def test_kill_during_write_leaves_old_or_complete(tmp_path, delay):
    a, b = tmp_path / "r.json", tmp_path / "r.pdf"
    a.write_bytes(b"O" * 10)
    b.write_bytes(b"O" * 10)
    proc = _start_writer(a, b, "N", 0.2)
    time.sleep(delay)
    proc.send_signal(signal.SIGKILL)
    proc.wait()
    for path, n in ((a, 200000), (b, 300000)):
        data = path.read_bytes()
        assert data in (b"O" * 10, b"N" * n)
    for n in os.listdir(tmp_path):
        assert n in ("r.json", "r.pdf", ".r.json.lock", ".r.pdf.lock") or (
            n.startswith((".r.json.", ".r.pdf.")) and n.endswith(".part"))


def test_concurrent_commits_never_mix(tmp_path):
    a, b = tmp_path / "r.json", tmp_path / "r.pdf"
    procs = [_start_writer(a, b, tag, 0.3) for tag in "XY"]
    assert [p.wait(timeout=60) for p in procs] == [0, 0]
    ja, jb = a.read_bytes(), b.read_bytes()
    assert ja[:1] == jb[:1] and ja == ja[:1] * 200000 and jb == jb[:1] * 300000
