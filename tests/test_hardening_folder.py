"""The report folder switches as a whole: interrupts, kills and a full disk leave either the
earlier report or the new one, never a mix, and the next run removes what a killed run left.

Real signals are sent to a real process writing a report (``SIGINT`` and ``SIGKILL``, timed
from the moment its staging folder appears); the full disk is a real small tmpfs mounted for
the test when running as root (skipped otherwise), and also a write that raises ``ENOSPC``
(fault injection, runs everywhere).
"""

import errno
import hashlib
import json
import os
import pickle
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from regimetrend import load_series
from regimetrend.errors import InputError

DEMO = Path(__file__).resolve().parents[1] / "demo" / "lumen_grid_energy.csv"
REPORT_FILES = ("report.html", "report.json", "report.xlsx")

# The child process does the real switch of a report built beforehand (building charts is
# the slow part, and the same for every case).
WRITER = """
import pickle, sys
from regimetrend.report.writer import publish_report
outputs = pickle.load(open(sys.argv[1], "rb"))
try:
    publish_report(sys.argv[2], outputs)
except KeyboardInterrupt:
    sys.exit(130)
"""


def _outputs(name):
    from regimetrend.analysis import analyze
    from regimetrend.report.content import build
    from regimetrend.report.extract import gather
    from regimetrend.report.writer import build_outputs

    series = load_series(DEMO, name=name)
    analysis = analyze(series, shape="exponential", seasonality="dummies", horizon=3, step=12,
                       max_breaks=1)
    data = gather(analysis, None)
    return build_outputs(data, build(data))


@pytest.fixture(scope="module")
def analyses(tmp_path_factory):
    """Two built reports told apart by the series name, and their pickles for a child."""
    folder = tmp_path_factory.mktemp("pickles")
    out = {}
    for name in ("first analysis", "second analysis"):
        built = _outputs(name)
        path = folder / (name.split()[0] + ".pickle")
        path.write_bytes(pickle.dumps(built))
        out[name] = (built, path)
    return out


def write_report(built, folder):
    from regimetrend.report.writer import publish_report

    return publish_report(folder, built)


def whole(folder: Path) -> str | None:
    """The series name of the one analysis ``folder`` holds (None: no report at all); fails
    when the folder mixes two runs or a listed file is missing or changed."""
    if not folder.exists() or not any((folder / n).exists() for n in REPORT_FILES):
        charts = list(folder.glob("charts/*.png")) + list(folder.glob("tables/*.csv"))
        assert not charts, f"report parts without a report: {charts}"
        return None
    result = json.loads((folder / "report.json").read_text(encoding="utf-8"))
    listed = set(result["report"]["files"])
    for rel, digest in result["report"]["checksums"].items():
        assert hashlib.sha256((folder / rel).read_bytes()).hexdigest() == digest, rel
    present = {p.relative_to(folder).as_posix() for p in folder.rglob("*") if p.is_file()}
    extra = {p for p in present - listed if not p.startswith("mine")}
    assert not extra, f"files outside the manifest: {extra}"
    name = result["series"]["name"]
    assert name in (folder / "report.html").read_text(encoding="utf-8")
    return name


def hidden_leftovers(folder: Path) -> list[str]:
    beside = [p.name for p in folder.parent.iterdir() if p.name.startswith(f".{folder.name}.")]
    inside = [p.relative_to(folder).as_posix() for p in folder.rglob(".*")] \
        if folder.exists() else []
    return beside + inside


def _start(pickle_path, folder):
    return subprocess.Popen([sys.executable, "-c", WRITER, str(pickle_path), str(folder)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)


def _signal_when_staging(proc, folder: Path, sig, delay: float) -> None:
    """Send ``sig`` ``delay`` seconds after the child's staging folder appears (or when it
    exits first)."""
    prefix = f".{folder.name}.regimetrend-{proc.pid}-"
    deadline = time.monotonic() + 120
    while proc.poll() is None and time.monotonic() < deadline:
        if any(n.startswith(prefix) for n in os.listdir(folder.parent)):
            break
        time.sleep(0.0005)
    time.sleep(delay)
    if proc.poll() is None:
        proc.send_signal(sig)
    proc.communicate(timeout=120)


# The switch takes about 0.1-0.3 s here (a fsync per file): the delays land before, inside
# and after the swap; every outcome must be one whole report.
@pytest.mark.parametrize("sig, delays", [(signal.SIGKILL, (0.0, 0.1, 0.15, 0.3)),
                                         (signal.SIGINT, (0.05, 0.12, 0.3))])
def test_signals_during_the_write_leave_one_whole_report(tmp_path, analyses, sig, delays):
    (first, _), (_, second_pickle) = analyses["first analysis"], analyses["second analysis"]
    for i, delay in enumerate(delays):
        folder = tmp_path / f"rep{i}"
        write_report(first, folder)
        (folder / "mine.txt").write_text("the analyst's notes")
        proc = _start(second_pickle, folder)
        _signal_when_staging(proc, folder, sig, delay)
        assert whole(folder) in ("first analysis", "second analysis"), delay
        assert (folder / "mine.txt").read_text() == "the analyst's notes"
        if sig == signal.SIGINT:
            assert proc.returncode in (0, 130, -signal.SIGINT)  # -2: it had finished
            assert hidden_leftovers(folder) == []  # an interrupted run cleans up after itself
        write_report(first, folder)  # the next run finishes or removes what was left
        assert whole(folder) == "first analysis"
        assert hidden_leftovers(folder) == []
        assert (folder / "mine.txt").read_text() == "the analyst's notes"


def test_a_kill_into_an_empty_folder_leaves_no_report_or_a_whole_one(tmp_path, analyses):
    _, pickle_path = analyses["second analysis"]
    for i, delay in enumerate((0.0, 0.15)):
        folder = tmp_path / f"fresh{i}"
        proc = _start(pickle_path, folder)
        _signal_when_staging(proc, folder, signal.SIGKILL, delay)
        assert whole(folder) in (None, "second analysis")


def test_a_cli_interrupt_during_the_analysis_leaves_the_folder_as_it_was(tmp_path, analyses):
    folder = tmp_path / "rep"
    write_report(analyses["first analysis"][0], folder)
    before = {p: p.read_bytes() for p in folder.rglob("*") if p.is_file()}
    proc = subprocess.Popen([sys.executable, "-m", "regimetrend", "report", str(DEMO),
                             "--output", str(folder)], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True)
    # Once the command runs (numpy mapped in: it loads inside the command, not at start-up),
    # an interrupt while loading or analysing is one line and exit 130. Before that moment the
    # interpreter itself is starting and regimetrend has no say.
    maps = Path(f"/proc/{proc.pid}/maps")
    deadline = time.monotonic() + 60
    while maps.exists() and "numpy" not in maps.read_text(errors="replace") \
            and time.monotonic() < deadline:
        time.sleep(0.01)
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=120)
    assert proc.returncode == 130
    assert err.strip() == "regimetrend: interrupted"
    assert {p: p.read_bytes() for p in folder.rglob("*") if p.is_file()} == before


# ---------------------------------------------------------------- what a killed run leaves behind


def test_the_next_run_finishes_a_swap_killed_between_its_two_renames(tmp_path, analyses):
    """The state a kill leaves between 'old folder moved aside' and 'new folder moved in' on a
    file system without an exchanging rename: the next run puts the complete new one in place
    and removes the old one."""
    from regimetrend.output_folder import recover

    first, second = analyses["first analysis"][0], analyses["second analysis"][0]
    folder = tmp_path / "rep"
    dead = _dead_pid()
    write_report(first, tmp_path / "old")
    write_report(second, tmp_path / "new")
    (tmp_path / "new" / ".new").touch()  # a complete staging folder is marked so
    os.rename(tmp_path / "old", tmp_path / f".rep.regimetrend-{dead}-aaaa")
    os.rename(tmp_path / "new", tmp_path / f".rep.regimetrend-{dead}-bbbb")
    recover(folder, "report.json")
    assert whole(folder) == "second analysis" and hidden_leftovers(folder) == []


def test_the_next_run_puts_back_the_old_folder_when_the_new_one_was_incomplete(tmp_path,
                                                                                analyses):
    from regimetrend.output_folder import recover

    folder = tmp_path / "rep"
    dead = _dead_pid()
    write_report(analyses["first analysis"][0], tmp_path / "old")
    os.rename(tmp_path / "old", tmp_path / f".rep.regimetrend-{dead}-aaaa")
    partial = tmp_path / f".rep.regimetrend-{dead}-bbbb"
    (partial / "charts").mkdir(parents=True)
    (partial / ".new").touch()
    (partial / "charts" / "cusum.png").write_bytes(b"half")
    recover(folder, "report.json")
    assert whole(folder) == "first analysis" and hidden_leftovers(folder) == []


def test_orphan_temporaries_of_older_versions_and_dead_writers_are_removed(tmp_path, analyses):
    folder = tmp_path / "rep"
    write_report(analyses["first analysis"][0], folder)
    dead = _dead_pid()
    orphans = [folder / ".report.json.k3j_x9ab", folder / "charts" / ".cusum.png.0abcdefg",
               folder / f".report.html.regimetrend-{dead}-zz12"]
    keep = [folder / ".hidden-notes.txt", folder / "charts" / ".mine.png.notatemp"]
    for p in orphans + keep:
        p.write_bytes(b"x")
    live = tmp_path / f".rep.regimetrend-{os.getpid()}-live"  # a writer still running: kept
    live.mkdir()
    write_report(analyses["second analysis"][0], folder)
    assert [p for p in orphans if p.exists()] == []
    assert all(p.read_bytes() == b"x" for p in keep)
    assert live.is_dir()


def _dead_pid() -> int:
    proc = subprocess.Popen([sys.executable, "-c", "pass"])
    proc.wait()
    return proc.pid


# ------------------------------------------------------------------------------ a full disk


def _mount_tmpfs(where: Path, size_k: int) -> bool:
    where.mkdir(parents=True, exist_ok=True)
    if not hasattr(os, "geteuid") or os.geteuid() != 0:
        return False
    rc = subprocess.run(["mount", "-t", "tmpfs", "-o", f"size={size_k}k", "tmpfs", str(where)],
                        capture_output=True, check=False).returncode
    return rc == 0


@pytest.mark.parametrize("size_k", [300, 1300, 1600])
def test_a_full_disk_leaves_the_earlier_report_whole_on_a_small_tmpfs(tmp_path, analyses,
                                                                      size_k):
    """A real small tmpfs (needs root; skipped otherwise). A report is about 0.6-0.9 MB, so
    300k fails on the first report; 1300k and 1600k hold one report but not a second beside it."""
    disk = tmp_path / "disk"
    if not _mount_tmpfs(disk, size_k):
        pytest.skip("mounting a tmpfs needs root")
    try:
        folder = disk / "rep"
        first, second = analyses["first analysis"][0], analyses["second analysis"][0]
        try:
            write_report(first, folder)
        except InputError as exc:
            assert "No space left" in str(exc) and "--output" in str(exc)
            assert not folder.exists() and os.listdir(disk) == []
            return
        with pytest.raises(InputError, match="No space left on device"):
            write_report(second, folder)
        assert whole(folder) == "first analysis"
        assert hidden_leftovers(folder) == []
    finally:
        subprocess.run(["umount", str(disk)], check=True)


@pytest.mark.parametrize("fail_at", [0, 3, 9, 12])
def test_a_write_that_raises_enospc_leaves_the_earlier_report_whole(tmp_path, analyses,
                                                                    monkeypatch, fail_at):
    """Fault injection: the ``fail_at``-th file written raises ENOSPC."""
    from regimetrend import output_folder

    folder = tmp_path / "rep"
    write_report(analyses["first analysis"][0], folder)
    real, count = output_folder._write, [0]

    def failing(path, payload):
        count[0] += 1
        if count[0] > fail_at:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC), str(path))
        real(path, payload)

    monkeypatch.setattr(output_folder, "_write", failing)
    with pytest.raises(InputError, match="--output: .*No space left on device"):
        write_report(analyses["second analysis"][0], folder)
    assert whole(folder) == "first analysis" and hidden_leftovers(folder) == []


def test_the_in_place_switch_is_used_for_the_current_folder_and_stays_whole(tmp_path, analyses,
                                                                           monkeypatch):
    """``--output .`` cannot be swapped (it holds the shell's current folder): files are staged
    inside it and moved in, manifest last, and no staging folder is left."""
    monkeypatch.chdir(tmp_path)
    (tmp_path / "mine.txt").write_text("keep")
    write_report(analyses["first analysis"][0], Path("."))
    write_report(analyses["second analysis"][0], Path("."))
    assert whole(tmp_path) == "second analysis"
    assert [n for n in os.listdir(tmp_path) if n.startswith(".")] == []
    assert (tmp_path / "mine.txt").read_text() == "keep"


def test_single_file_outputs_clean_what_a_killed_writer_left(tmp_path):
    from regimetrend.output import write_atomic

    dead = _dead_pid()
    left = [tmp_path / ".forecast.csv.abcd_123", tmp_path / f".forecast.csv.regimetrend-{dead}-x1"]
    for p in left:
        p.write_text("half")
    (tmp_path / ".other.csv.abcd_123").write_text("not a temporary of this file")
    write_atomic(tmp_path / "forecast.csv", "a,b\n")
    assert sorted(p.name for p in tmp_path.iterdir()) == [".other.csv.abcd_123", "forecast.csv"]


def test_the_workbook_is_the_same_bytes_on_every_run(analyses):
    """Two builds a few seconds apart: no creation time or zip entry time differs."""
    import io
    import zipfile

    built = analyses["first analysis"][0]
    again = _outputs("first analysis")
    assert built["workbook"][1] == again["workbook"][1]
    assert built["json"][1] == again["json"][1]  # its checksums included
    core = zipfile.ZipFile(io.BytesIO(built["workbook"][1])).read("docProps/core.xml")
    assert b"1980-01-01T00:00:00Z" in core


def test_a_folder_that_cannot_be_made_is_one_line(tmp_path, analyses, monkeypatch):
    """PermissionError while making the folder (root ignores file modes, so it is injected)."""
    from regimetrend.errors import InputError as Refused

    real = Path.mkdir

    def refuse(self, *args, **kwargs):
        if "locked" in str(self):
            raise PermissionError(13, "Permission denied", str(self))
        return real(self, *args, **kwargs)

    monkeypatch.setattr(Path, "mkdir", refuse)
    with pytest.raises(Refused, match="--output: cannot create folder .*Permission denied"):
        write_report(analyses["first analysis"][0], tmp_path / "locked" / "rep")


def test_any_other_refusal_by_the_system_is_one_line_and_exit_2(tmp_path, capsys, monkeypatch):
    from regimetrend.cli import main, scan

    def refuse(args):
        raise PermissionError(13, "Permission denied", str(tmp_path / "x\x1b.csv"))

    monkeypatch.setattr(scan, "run", refuse)
    assert main(["scan", str(DEMO)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Permission denied" in err and "\x1b" not in err
