"""Every file synccore writes goes through here: owned files only, all or nothing, crash-safe.

Ownership.  Each output folder keeps a manifest (``.synccore-manifest.json``): the name and
SHA-256 of every file synccore wrote there.  An existing file may be replaced without
``force`` only when its content still has the hash synccore recorded: a file of the user's
own, or a generated file the user has since edited, is never replaced silently.

All or nothing.  The new files are written into a staging folder inside the output folder and
flushed to disk; then a journal (``.synccore-journal.json``) naming them is put in place
atomically; then each is renamed over its target; then the manifest is replaced atomically and
the journal and staging folder removed.  A kill at any moment leaves either the old set, the
new set, or a journal that the next write into the folder finds: it finishes the renames
(the staged files are complete, the journal says so), records the manifest, says so, and goes
on.  Staging folders without a journal are leftovers of a write killed before its renames;
the next write removes them and says so.
"""

from __future__ import annotations

import hashlib
import json
import os
import shutil
import sys
import tempfile
from collections.abc import Callable, Mapping
from pathlib import Path

from synccore.errors import Problem, SpecError

MANIFEST = ".synccore-manifest.json"
JOURNAL = ".synccore-journal.json"
STAGING_PREFIX = ".synccore-staging-"


def digest(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def _fail(message: str) -> SpecError:
    return SpecError([Problem(None, "", message)])


def _read_json(path: Path) -> dict[str, object] | None:
    try:
        data = json.loads(path.read_bytes()[: 1 << 20])
    except (OSError, ValueError):
        return None
    return data if isinstance(data, dict) else None


def _manifest(folder: Path) -> dict[str, str]:
    data = _read_json(folder / MANIFEST) or {}
    files = data.get("files", {})
    return {k: v for k, v in files.items() if isinstance(k, str) and isinstance(v, str)} \
        if isinstance(files, dict) else {}  # fmt: skip


def _put_atomically(path: Path, data: bytes) -> None:
    tmp = path.with_name(path.name + ".tmp")
    with open(tmp, "wb") as handle:  # noqa: PTH123
        handle.write(data)
        handle.flush()
        os.fsync(handle.fileno())
    os.replace(tmp, path)


def _json(data: object) -> bytes:
    return (json.dumps(data, indent=1, sort_keys=True) + "\n").encode()


def owned(path: Path) -> bool:
    """Whether synccore wrote ``path`` and nobody has changed it since."""
    try:
        data = path.read_bytes()
    except OSError:
        return False
    return _manifest(path.parent).get(path.name) == digest(data)


def recover(folder: Path) -> list[str]:
    """Finish a write that was killed during its renames; remove staging leftovers.  Notes."""
    notes: list[str] = []
    journal = _read_json(folder / JOURNAL)
    if journal is not None:
        staging = folder / str(journal.get("staging", ""))
        files = journal.get("files", {})
        if isinstance(files, dict) and staging.name.startswith(STAGING_PREFIX):
            for name in files:
                if (staging / name).is_file():
                    os.replace(staging / name, folder / name)
            manifest = _manifest(folder) | {k: v for k, v in files.items() if isinstance(v, str)}
            _put_atomically(folder / MANIFEST, _json({"files": manifest}))
            notes.append(f"{folder}: an earlier write was interrupted while replacing its files; "
                         f"completed it ({len(files)} files)")  # fmt: skip
            shutil.rmtree(staging, ignore_errors=True)
        (folder / JOURNAL).unlink(missing_ok=True)
    for tmp in (folder / (JOURNAL + ".tmp"), folder / (MANIFEST + ".tmp")):
        tmp.unlink(missing_ok=True)
    try:
        leftovers = [p for p in folder.iterdir() if p.name.startswith(STAGING_PREFIX) and p.is_dir()]
    except OSError:
        leftovers = []
    for p in leftovers:
        shutil.rmtree(p, ignore_errors=True)
    if leftovers:
        notes.append(f"{folder}: removed {len(leftovers)} staging folder(s) left by an interrupted write")
    return notes


def _check_targets(folder: Path, names: list[str], force: bool) -> None:
    problems = []
    manifest = _manifest(folder)
    for name in names:
        if Path(name).name != name or name in ("", ".", "..") or name.startswith(".synccore-"):
            raise ValueError(f"file name {name!r} is not a plain file name")  # pragma: no cover
        target = folder / name
        if target.is_symlink() or (target.exists() and not target.is_file()):
            problems.append(Problem(None, "", f"{target}: exists and is not a regular file; refused"))
        elif target.exists() and not force and manifest.get(name) != digest(target.read_bytes()):
            problems.append(Problem(None, "", f"{target}: exists and was not written by synccore (or was "
                                              "changed since); pass --force to overwrite it"))  # fmt: skip
    if problems:
        raise SpecError(problems)


def write_files(files: Mapping[str, bytes], folder: str | Path, *, force: bool = False,
                notes: list[str] | None = None) -> list[Path]:  # fmt: skip
    """Write ``files`` (name → bytes) into ``folder``, all or none; :class:`SpecError` (one line
    each) when a target is not synccore's to replace or the folder cannot be written."""
    out = Path(folder)
    if str(folder) == "":
        raise _fail("the output folder is empty; name a folder (\".\" for this one)")
    if out.exists() and not out.is_dir():
        raise _fail(f"{out}: exists and is not a folder")
    try:
        out.mkdir(parents=True, exist_ok=True)
        found = recover(out)
    except OSError as exc:
        raise _fail(f"{out}: cannot write here: {exc.strerror}") from None
    if notes is not None:
        notes.extend(found)
    else:  # the caller has no place for them: they must not pass unseen
        for note in found:
            print(f"note: {note}", file=sys.stderr)
    _check_targets(out, list(files), force)
    try:
        staging = Path(tempfile.mkdtemp(prefix=STAGING_PREFIX, dir=out))
    except OSError as exc:
        raise _fail(f"{out}: cannot write here: {exc.strerror}") from None
    try:
        for name, data in files.items():
            with open(staging / name, "wb") as handle:  # noqa: PTH123
                handle.write(data)
                handle.flush()
                os.fsync(handle.fileno())
        hashes = {name: digest(data) for name, data in files.items()}
        _put_atomically(out / JOURNAL, _json({"staging": staging.name, "files": hashes}))
        for name in files:
            os.replace(staging / name, out / name)
        _put_atomically(out / MANIFEST, _json({"files": _manifest(out) | hashes}))
        (out / JOURNAL).unlink()
    except OSError as exc:
        what = Path(exc.filename or "").name or "files"
        raise _fail(f"{out}: cannot write {what}: {exc.strerror}") from None
    finally:
        if not (out / JOURNAL).exists():
            shutil.rmtree(staging, ignore_errors=True)
    return [out / name for name in files]


def write_file(path: str | Path, data: bytes | str, *, force: bool = False,
               notes: list[str] | None = None) -> Path:  # fmt: skip
    """One file, by the same rules (its folder's manifest records it)."""
    p = Path(path)
    if str(path) == "" or p.name in ("", ".", ".."):
        raise _fail(f"{str(path)!r} does not name a file")
    raw = data.encode("utf-8") if isinstance(data, str) else data
    return write_files({p.name: raw}, p.parent, force=force, notes=notes)[0]


def rendered(render: Callable[[Path], None], suffix: str) -> bytes:
    """The bytes a renderer that writes to a path (matplotlib, Pillow, schemdraw) produces."""
    with tempfile.TemporaryDirectory(prefix="synccore-render-") as tmp:
        target = Path(tmp) / f"picture{suffix}"
        render(target)
        return target.read_bytes()
