"""The recovery acts only on staging folders geomgen made, and nothing it does leaves the
output folder: planted staging folders, planted plans, links on the way of a name and a
manifest that names a file through a linked folder are all refused or left alone."""

from __future__ import annotations

import json
import os
import shutil
from pathlib import Path

import pytest
from conftest import snapshot

from geomgen.errors import ExportError
from geomgen.outputs import MANIFEST, Output, Staging, journal, sha256_of, write_set
from geomgen.outputs.lock import LOCK, FolderLock, registered

OLD = {"set": "s", "spec_sha256": "a" * 64, "command": "drawings"}
NEW = {"set": "s", "spec_sha256": "b" * 64, "command": "drawings"}


def outs(word: str, n: int = 3) -> list[Output]:
    return [Output(f"drawings/s-{i}.csv", "bytes", f"{word} {i}\n".encode()) for i in range(n)] + \
        [Output(f"report/s-{'gone' if word == 'old' else 'added'}.txt", "text", word)]


@pytest.fixture
def folder(tmp_path):
    out = tmp_path / "out"
    write_set(out, outs("old"), OLD)
    return out


def notes_of(out: Path) -> list[str]:
    with Staging(out) as stage:
        return stage.recovered


def test_a_users_folder_named_like_staging_is_never_removed(folder):
    mine = folder / ".geomgen-staging-backup"
    mine.mkdir()
    (mine / "thesis.txt").write_text("precious")
    done = write_set(folder, outs("new"), NEW)
    assert (mine / "thesis.txt").read_text() == "precious"
    assert not any("staging-backup" in n for n in done.notes())


def plant(out: Path, name: str, kind: str, outside: Path) -> None:
    """A plan geomgen did not write (the forms of the attack in the report)."""
    stage = out / name
    (stage / "new").mkdir(parents=True)
    had_old = kind == "overwrite"
    (stage / journal.PLAN).write_text(json.dumps(
        {"written_by": "geomgen", "files": [{"name": f"lnk/{'planted.sh' if kind == 'write' else 'victim.txt'}",
                                             "had_old": had_old}], "stale": []}))
    if kind in ("delete", "overwrite"):
        (stage / "new" / MANIFEST).write_text("")  # before the switch: roll back
    if kind == "overwrite":
        (stage / "old" / "lnk").mkdir(parents=True)
        (stage / "old" / "lnk" / "victim.txt").write_text("planted over the victim")
    if kind == "write":  # after the switch: roll forward places new/lnk/planted.sh
        (stage / "new" / "lnk").mkdir()
        (stage / "new" / "lnk" / "planted.sh").write_text("echo owned")
    (out / "lnk").symlink_to(outside)


@pytest.mark.parametrize("kind", ["delete", "overwrite", "write"])
@pytest.mark.parametrize("name", [".geomgen-staging-planted", ".geomgen-staging-0123456789ab"])
def test_a_planted_plan_never_reaches_outside_the_folder(tmp_path, folder, kind, name):
    outside = tmp_path / "victim"
    outside.mkdir()
    (outside / "victim.txt").write_text("the victim's file")
    plant(folder, name, kind, outside)
    before = snapshot(outside)
    write_set(folder, outs("new"), NEW)
    assert snapshot(outside) == before  # nothing removed, replaced or added out there
    assert (folder / name / journal.PLAN).exists()  # and the planted folder is not geomgen's to remove


def killed_at(out: Path, what: str) -> None:
    """Run a commit of the new set in a child and stop it dead at the step ``what``."""
    pid = os.fork()
    if pid == 0:
        def stop(step):
            if step == what:
                os._exit(9)
        journal._step = stop
        try:
            write_set(out, outs("new"), NEW)
        finally:
            os._exit(0)
    _, status = os.waitpid(pid, 0)
    assert os.waitstatus_to_exitcode(status) == 9


@pytest.mark.parametrize("step", ["plan in place", "switched"])
def test_a_real_leftover_whose_folder_became_a_link_is_refused_whole(tmp_path, folder, step):
    killed_at(folder, step)
    assert len(journal.leftovers(folder)) == 1
    outside = tmp_path / "elsewhere"
    shutil.move(folder / "drawings", outside)  # the user's link where geomgen's folder was
    (folder / "drawings").symlink_to(outside)
    before = snapshot(outside)
    with pytest.raises(ExportError, match="link"):
        notes_of(folder)
    assert snapshot(outside) == before
    assert len(journal.leftovers(folder)) == 1  # kept for a run that can finish it
    (folder / "drawings").unlink()
    shutil.move(outside, folder / "drawings")
    notes = notes_of(folder)
    assert any("interrupted" in n for n in notes) and not journal.leftovers(folder)
    assert not (folder / LOCK).exists()


def test_a_manifest_naming_a_file_through_a_linked_folder_never_removes_it(tmp_path, folder):
    outside = tmp_path / "victim"
    outside.mkdir()
    victim = outside / "victim.txt"
    victim.write_text("the victim's file")
    (folder / "lnk").symlink_to(outside)
    m = json.loads((folder / MANIFEST).read_text())
    m["files"].append({"name": "lnk/victim.txt", "size": victim.stat().st_size, "sha256": sha256_of(victim),
                       "geomgen_version": "0", **OLD})
    (folder / MANIFEST).write_text(json.dumps(m))
    done = write_set(folder, outs("new"), NEW)
    assert victim.read_text() == "the victim's file" and "lnk/victim.txt" not in done.removed_stale


@pytest.mark.parametrize("name", ["a/../b.txt", "./a.txt", "a//b.txt", "/abs.txt", "a/./b.txt", "", "a\\b.txt"])
def test_names_that_are_not_plain_are_refused(tmp_path, name):
    with pytest.raises(ExportError):
        journal.inside(tmp_path, name)


def test_a_file_on_the_way_of_a_name_is_refused(tmp_path):
    (tmp_path / "cad").write_text("a file, not a folder")
    with pytest.raises(ExportError, match="not a folder"):
        journal.inside(tmp_path, "cad/x.step")


def test_a_recorded_staging_folder_without_its_token_is_left_alone(tmp_path, folder):
    with FolderLock(folder) as lock:  # the register names it, but someone else's folder is there
        lock.register(".geomgen-staging-00000000abcd", "f" * 32)
    mine = folder / ".geomgen-staging-00000000abcd"
    mine.mkdir()
    (mine / "notes.txt").write_text("mine")
    notes = notes_of(folder)
    assert (mine / "notes.txt").read_text() == "mine" and any("left" in n and "token" in n for n in notes)
    assert not registered(folder)


@pytest.mark.parametrize("step", ["stage registered", "stage made", "stage token written"])
def test_a_kill_while_making_the_staging_folder_leaves_nothing(folder, step):
    before = snapshot(folder)
    killed_at(folder, step)
    notes_of(folder)
    assert snapshot(folder) == before and not journal.leftovers(folder) and not registered(folder)
