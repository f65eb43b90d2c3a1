"""A folder of outputs replaced as a whole, so it never mixes two runs.

``publish_folder`` writes every file of a run into a hidden staging folder beside the target
(``.NAME.regimetrend-PID-XXXX``), the manifest last, and then swaps the two folders with one
rename: Linux's ``renameat2(RENAME_EXCHANGE)`` where the file system has it, else two renames
that the next run finishes when it was killed between them. Until the swap the folder is as it
was; after it, it is wholly the new run's. A failure while writing (a full disk, an interrupt)
removes the staging folder and leaves the target untouched.

Files in the folder that are not the earlier run's own (the analyst's notes, the input itself)
are carried into the new folder as hard links, so they are never copied, changed or lost. When
a swap is not possible (the folder is the current folder or holds it, a mount point, owned by
someone else, its parent not writable, hard links refused, or too many foreign files to carry),
the files are staged inside the folder instead and moved into place with interrupts held back
and the old manifest removed first, so a reader that reads the manifest first never sees a
mixed folder as complete; a run killed in that short step is finished by the next run.

Temporaries carry the writing process's id; the next run removes those whose process is gone,
and the unnamed temporaries (``.report.json.abcd1234``) that older versions left behind.
"""

from __future__ import annotations

import contextlib
import ctypes
import errno
import os
import re
import shutil
import signal
from collections.abc import Set as AbstractSet
from pathlib import Path

from .errors import InputError

STAGING = "regimetrend"  # marks our staging folders and temporaries
CARRY_LIMIT = 5000  # foreign entries carried by hard link before giving up the swap
_LEGACY_TMP = re.compile(r"^\.(?P<name>.+)\.[a-z0-9_]{8}$")  # tempfile.mkstemp's names
_OURS = re.compile(r"^\.(?P<name>.*)\." + STAGING + r"-(?P<pid>\d+)-[a-z0-9_]+$")


class _NoSwap(Exception):
    """The folder cannot be swapped as a whole; the in-place switch is used instead."""


def pid_alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, OSError):
        return True
    return True


def orphan(name: str, known: AbstractSet[str] = frozenset()) -> bool:
    """Is ``name`` a temporary of ours whose writer is gone (or an older version's temporary of
    one of the ``known`` output names)?"""
    m = _OURS.match(name)
    if m:
        return not pid_alive(int(m["pid"]))
    legacy = _LEGACY_TMP.match(name)
    return legacy is not None and legacy["name"] in known


def temp_prefix(name: str) -> str:
    """Prefix for a temporary of ``name`` made by this process."""
    return f".{name}.{STAGING}-{os.getpid()}-"


@contextlib.contextmanager
def held_interrupts():
    """Hold SIGINT and SIGTERM back for a short step that must not be cut in two; they take
    effect (KeyboardInterrupt, termination) right after it."""
    import threading

    if threading.current_thread() is not threading.main_thread():
        yield
        return
    caught: list[int] = []
    sigs = [s for s in (signal.SIGINT, signal.SIGTERM) if s is not None]
    before = {s: signal.getsignal(s) for s in sigs}
    for s in sigs:
        signal.signal(s, lambda num, frame: caught.append(num))
    try:
        yield
    finally:
        for s, handler in before.items():
            signal.signal(s, handler if handler is not None else signal.SIG_DFL)
        for s in dict.fromkeys(caught):
            signal.raise_signal(s)


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths in one step (Linux renameat2 RENAME_EXCHANGE); False when unavailable."""
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    at_fdcwd, rename_exchange = -100, 2
    rc = renameat2(at_fdcwd, os.fsencode(str(a)), at_fdcwd, os.fsencode(str(b)), rename_exchange)
    if rc == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.ENOSYS, errno.EINVAL, errno.ENOTSUP, errno.EOPNOTSUPP):
        return False
    raise OSError(err, os.strerror(err), str(a))


def _write(path: Path, payload) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    data = payload.encode("utf-8") if isinstance(payload, str) else bytes(payload)
    with open(path, "xb") as fh:
        fh.write(data)
        fh.flush()
        os.fsync(fh.fileno())  # a full disk shows here, not after the swap


def _rmtree(path: Path) -> None:
    shutil.rmtree(path, ignore_errors=True)


def _siblings(parent: Path, name: str) -> list[Path]:
    """Our staging folders beside ``parent/name`` whose writer is gone."""
    try:
        entries = list(os.scandir(parent))
    except OSError:
        return []
    out = []
    for e in entries:
        m = _OURS.match(e.name)
        if m and m["name"] == name and e.is_dir(follow_symlinks=False) \
                and not pid_alive(int(m["pid"])):
            out.append(Path(e.path))
    return out


def recover(target: Path, manifest: str) -> None:
    """Finish or undo a switch an earlier run was killed in, and remove its temporaries.

    Beside the folder: when the folder is missing, a complete staging folder (it holds the
    manifest, written last) becomes the folder, else the saved old folder is put back; every
    other staging folder is removed. Inside the folder: a complete in-place staging folder is
    moved into place; any other is removed."""
    left = _siblings(target.parent, target.name)
    if left and not os.path.lexists(target):
        complete = [p for p in left if (p / manifest).is_file() and (p / ".new").exists()]
        old = [p for p in left if not (p / ".new").exists()]
        candidates: list[Path] = complete or old
        if candidates:
            chosen = candidates[0]
            os.rename(chosen, target)
            with contextlib.suppress(FileNotFoundError):
                os.unlink(target / ".new")
            left.remove(chosen)
    for p in left:
        _rmtree(p)
    if target.is_dir():
        for e in list(os.scandir(target)):
            m = _OURS.match(e.name)
            if not (m and m["name"] == "" and e.is_dir(follow_symlinks=False)) \
                    or pid_alive(int(m["pid"])):
                continue
            if (Path(e.path) / manifest).is_file():
                with held_interrupts():
                    _commit_in_place(Path(e.path), target, manifest)
            else:
                _rmtree(Path(e.path))


def remove_orphans(folder: Path, known: set[Path]) -> None:
    """Remove temporaries left in ``folder`` and its subfolders of ``known`` files by a writer
    that is gone."""
    by_dir: dict[Path, set[str]] = {}
    for rel in known:
        by_dir.setdefault(rel.parent, set()).add(rel.name)
    for sub, names in by_dir.items():
        try:
            entries = list(os.scandir(folder / sub))
        except OSError:
            continue
        for e in entries:
            if e.is_file(follow_symlinks=False) and orphan(e.name, names):
                with contextlib.suppress(OSError):
                    os.unlink(e.path)


def _swap_refusal(target: Path) -> str | None:
    """Why the folder cannot be swapped as a whole (None when it can)."""
    parent = target.parent
    if not os.access(parent, os.W_OK | os.X_OK):
        return "its parent folder is not writable"
    if not target.exists():
        return None
    if os.path.ismount(target):
        return "it is a mount point"
    st = target.stat()
    if hasattr(os, "geteuid") and st.st_uid != os.geteuid():
        return "it belongs to another user"
    try:
        cwd = Path.cwd().resolve()
    except OSError:
        return None
    if cwd == target or target in cwd.parents:
        return "it holds the current folder"
    return None


def _carry(src: Path, dst: Path, skip: set[Path], known: set[Path], rel: Path = Path(),
           count: list[int] | None = None) -> None:
    """Hard-link every entry of ``src`` that is not in ``skip`` (the earlier run's own files)
    into ``dst``; entries the new run wrote stay the new run's."""
    count = count if count is not None else [0]
    for e in os.scandir(src):
        r = rel / e.name
        if r in skip or orphan(e.name, {k.name for k in known if k.parent == rel}):
            continue
        count[0] += 1
        if count[0] > CARRY_LIMIT:
            raise _NoSwap(f"it holds more than {CARRY_LIMIT} other files")
        out = dst / e.name
        if e.is_dir(follow_symlinks=False):
            if not out.exists():
                out.mkdir()
                shutil.copymode(e.path, out)
            if out.is_dir() and not out.is_symlink():
                _carry(Path(e.path), out, skip, known, r, count)
        elif not os.path.lexists(out):
            try:
                os.link(e.path, out, follow_symlinks=False)
            except OSError as exc:
                raise _NoSwap(f"cannot link {r}: {exc.strerror}") from None


def _move_late_arrivals(old: Path, new: Path) -> None:
    """Entries that appeared in the old folder after carrying (top level only)."""
    for e in os.scandir(old):
        if e.name == ".new" or os.path.lexists(new / e.name):
            continue
        with contextlib.suppress(OSError):
            os.rename(e.path, new / e.name)


def _commit_in_place(staging: Path, target: Path, manifest: str) -> None:
    """Move a complete staging folder's files into ``target``: the old manifest goes first,
    the new one last; then the earlier run's files listed in ``.stale`` are removed."""
    with contextlib.suppress(FileNotFoundError):
        os.unlink(target / manifest)
    stale = []
    with contextlib.suppress(OSError):
        stale = [s for s in (staging / ".stale").read_text(encoding="utf-8").splitlines() if s]
    files = sorted(p.relative_to(staging) for p in staging.rglob("*")
                   if p.is_file() and p.name not in (".stale",))
    for rel in [f for f in files if f != Path(manifest)] + [Path(manifest)]:
        (target / rel).parent.mkdir(parents=True, exist_ok=True)
        os.replace(staging / rel, target / rel)
    for s in stale:
        p = target / s
        if p.is_file() and not p.is_symlink():
            with contextlib.suppress(OSError):
                p.unlink()
    _rmtree(staging)


def _fail(what: str, folder: Path, exc: OSError):
    return InputError(f"{what}: cannot write the report into {folder}: "
                      f"{exc.strerror or exc}; the folder was left as it was")


def publish_folder(folder, files: dict[Path, bytes | str], *, earlier_own,
                   manifest: str, what: str = "--output") -> Path:
    """Make ``folder`` hold exactly this run's ``files`` (relative path -> bytes or text; the
    ``manifest`` is written last) plus whatever was there that is not the earlier run's own
    (``earlier_own(target)``, read from its manifest after any interrupted switch is finished).
    The switch is all or nothing."""
    folder = Path(folder)
    target = Path(os.path.realpath(folder))
    parent = target.parent
    try:
        parent.mkdir(parents=True, exist_ok=True)
        if target.exists() and not target.is_dir():
            raise InputError(f"{what}: {folder} is a file, not a folder")
        recover(target, manifest)
    except OSError as exc:
        raise InputError(f"{what}: cannot create folder {folder}: "
                         f"{exc.strerror or exc}") from None
    earlier_own = set(earlier_own(target)) if target.is_dir() else set()
    written = set(files)
    known = written | set(earlier_own) | {Path(manifest)}
    if target.is_dir():
        remove_orphans(target, known)
    order = [r for r in files if r != Path(manifest)] + [Path(manifest)]
    refusal = _swap_refusal(target)
    if refusal is None:
        try:
            staging = Path(_mkdtemp(parent, target.name))
        except OSError as exc:
            raise _fail(what, folder, exc) from None
        try:
            try:
                (staging / ".new").touch()
                for rel in order:
                    _write(staging / rel, files[rel])
                if target.exists():
                    _carry(target, staging, set(earlier_own) | written, known)
                    shutil.copymode(target, staging)
                else:
                    os.chmod(staging, 0o777 & ~_umask())
            except OSError as exc:
                raise _fail(what, folder, exc) from None
            try:
                _swap(staging, target)
            except OSError as exc:
                raise _fail(what, folder, exc) from None
            return folder
        except _NoSwap:
            pass
        finally:
            with held_interrupts():
                _rmtree(staging)
    return _publish_in_place(target, folder, files, order, earlier_own, manifest, what)


def _swap(staging: Path, target: Path) -> None:
    """Put the complete ``staging`` folder in ``target``'s place; the old one ends in
    ``staging`` (removed by the caller)."""
    with held_interrupts():
        os.unlink(staging / ".new")
        if not target.exists():
            os.rename(staging, target)
            return
        if _exchange(staging, target):
            _move_late_arrivals(staging, target)
            return
        old = Path(_mkdtemp(target.parent, target.name))
        (staging / ".new").touch()  # complete: the next run finishes a killed switch
        os.rmdir(old)
        os.rename(target, old)
        try:
            os.rename(staging, target)
        except OSError:
            os.rename(old, target)
            raise
        os.unlink(target / ".new")
        _move_late_arrivals(old, target)
        os.rename(old, staging)


def _publish_in_place(target: Path, folder: Path, files, order, earlier_own, manifest,
                      what) -> Path:
    try:
        target.mkdir(parents=True, exist_ok=True)
        staging = Path(_mkdtemp(target, ""))
    except OSError as exc:
        raise _fail(what, folder, exc) from None
    try:
        try:
            stale = sorted(p.as_posix() for p in set(earlier_own) - set(files))
            _write(staging / ".stale", "\n".join(stale) + "\n")
            for rel in order:
                _write(staging / rel, files[rel])
        except OSError as exc:
            raise _fail(what, folder, exc) from None
        with held_interrupts():
            _commit_in_place(staging, target, manifest)
    finally:
        with held_interrupts():
            _rmtree(staging)
    return folder


def _mkdtemp(parent: Path, name: str) -> str:
    import tempfile

    return tempfile.mkdtemp(prefix=temp_prefix(name), dir=parent)


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask
