"""Shared and awkward output and cache folders: a clear error or a working build, and
never a staging folder left behind (sdofreport.site.tree, sdofreport.site.render).

Sources of expected values: the byte snapshot of the good site (tests/hardening/
conftest.py) for builds that must work; POSIX semantics of flock(2) (released when the
holder dies), rename(2) and file ownership for the cases that must be refused. Root
may rename and write anything: a read-only folder is made immutable (chattr +i) when
the tests run as root, and another user's folder is shown by faking this process's uid.
"""

from __future__ import annotations

import os
import shutil
import signal

import pytest

from sdofreport.site.tree import OutputLock
from tests.conftest import read_only_folder
from tests.hardening.conftest import assert_user_error, invoke, snapshot, staging_leftovers

NOBODY = 65534
ROOT = hasattr(os, "getuid") and os.getuid() == 0


def _build(good_build, site, *extra):
    return invoke("build", good_build["project"], "-o", site, "--cache-dir",
                  good_build["cache"], "--jobs", "1", "-q", *extra)


def test_a_second_build_into_the_same_folder_is_refused(good_build, tmp_path):
    # Reproduction: a second build into the same folder deleted the first one's staging
    # folder. Here the first build holds the lock, with its staging folder beside.
    site = tmp_path / "site"
    shutil.copytree(good_build["site"], site)
    first_staging = tmp_path / ".site.building-first"
    first_staging.mkdir()
    with OutputLock(site):
        result = _build(good_build, site)
        assert_user_error(result, "another sdofreport run", f"process {os.getpid()}",
                          "wait until it has finished")
        assert first_staging.is_dir()  # the first build's work is untouched
        assert snapshot(site) == good_build["snapshot"]
    first_staging.rmdir()
    assert not (tmp_path / ".site.lock").exists()  # removed on release


def test_a_killed_holder_does_not_block_the_next_build(good_build, tmp_path):
    site = tmp_path / "site"
    pid = os.fork()
    if pid == 0:  # a build that takes the lock and is killed
        OutputLock(site).acquire()
        os.kill(os.getpid(), signal.SIGKILL)
    os.waitpid(pid, 0)
    assert (tmp_path / ".site.lock").exists()  # left behind by the killed build
    result = _build(good_build, site)
    assert result.exit_code == 0, (result.output, result.exception)
    # flock(2): the lock went with its holder; the same bytes as the good site.
    assert snapshot(site) == good_build["snapshot"]
    assert staging_leftovers(site) == [] and not (tmp_path / ".site.lock").exists()


@pytest.mark.parametrize("inside", [False, True])
def test_output_dot_is_refused_cleanly(good_build, tmp_path, monkeypatch, inside):
    # Reproduction: -o . built beside the parent of the current folder and failed at
    # the swap with an operating-system error.
    here = tmp_path / "here"
    if inside:
        shutil.copytree(good_build["site"], here)  # standing in an old site
    else:
        here.mkdir()
    monkeypatch.chdir(here)
    before = {folder: sorted(os.listdir(folder)) for folder in (here, tmp_path)}
    result = _build(good_build, ".")
    assert_user_error(result, "is the current folder", "-o _site")
    parent_result = _build(good_build, "..")
    assert_user_error(parent_result, "a folder above the current one")
    # Nothing staged, locked or moved beside the folder or inside it.
    assert {folder: sorted(os.listdir(folder)) for folder in (here, tmp_path)} == before


def test_output_that_is_a_symbolic_link_is_refused_cleanly(good_build, tmp_path):
    # Reproduction: -o naming a link swapped the link itself away and left a staging
    # folder behind.
    target = tmp_path / "real-site"
    shutil.copytree(good_build["site"], target)
    link = tmp_path / "site"
    link.symlink_to(target)
    result = _build(good_build, link)
    assert_user_error(result, "is a symbolic link", str(target))
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert snapshot(target) == good_build["snapshot"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["real-site", "site"]


def test_an_old_site_owned_by_another_user_is_refused_before_any_work(good_build, tmp_path,
                                                                    monkeypatch):
    # Reproduction: the build ran to the end, failed at the swap with an operating-
    # system error and left a folder beside the site. The owner is read from the
    # folder; this process is made to look like user 12345 (root may replace anything).
    site = tmp_path / "site"
    shutil.copytree(good_build["site"], site)
    owner = site.stat().st_uid
    monkeypatch.setattr(os, "getuid", lambda: owner + 12345)
    result = _build(good_build, site, "--no-cache")
    assert_user_error(result, "belongs to another user", f"uid {owner}", "another -o")
    assert snapshot(site) == good_build["snapshot"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


@pytest.mark.skipif(not ROOT, reason="chown to another user needs root")
def test_root_may_replace_an_old_site_of_another_user(good_build, tmp_path):
    site = tmp_path / "site"
    shutil.copytree(good_build["site"], site)
    os.chown(site, NOBODY, NOBODY)
    result = _build(good_build, site)
    assert result.exit_code == 0, (result.output, result.exception)
    assert snapshot(site) == good_build["snapshot"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


def test_a_swap_that_fails_leaves_the_old_site_and_nothing_beside(tmp_path, monkeypatch):
    """Whatever stops the swap (an old site that cannot be moved: rename(2) EACCES or
    EPERM), the old site stays and no staging or retired folder is left."""
    from sdofreport.errors import BuildError
    from sdofreport.site import tree as tree_module

    site = tree_module.write_tree({"old.txt": b"old"}, tmp_path / "site")
    monkeypatch.setattr(tree_module, "_exchange", lambda a, b: False)
    real_replace = os.replace

    def refuse_moving_the_site(source, target):
        if os.fspath(source) == os.fspath(site):
            raise PermissionError(13, "Permission denied")
        real_replace(source, target)

    monkeypatch.setattr(tree_module.os, "replace", refuse_moving_the_site)
    with pytest.raises(BuildError, match="could not take the place of the old one"):
        tree_module.write_tree({"new.txt": b"new"}, site)
    assert snapshot(site) == {"old.txt": b"old"}
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


def test_an_empty_read_only_cache_folder_does_not_stop_a_build(good_build, tmp_path):
    # Reproduction: an empty read-only --cache-dir stopped the build with an error.
    cache = tmp_path / "cache"
    cache.mkdir(mode=0o700)
    with read_only_folder(cache):
        result = invoke("build", good_build["project"], "-o", tmp_path / "site",
                        "--cache-dir", cache, "--jobs", "1", "-q")
        assert os.listdir(cache) == []
    assert result.exit_code == 0, (result.output, result.exception)
    assert snapshot(tmp_path / "site") == good_build["snapshot"]
    assert sorted(p.name for p in tmp_path.iterdir()) == ["cache", "site"]


def test_every_tree_writer_checks_and_locks_its_output(tmp_path, monkeypatch):
    """write_tree (the register's writer) follows the same rules as a build."""
    from sdofreport.errors import BuildError
    from sdofreport.site.tree import write_tree

    monkeypatch.chdir(tmp_path)
    with pytest.raises(BuildError, match="is the current folder"):
        write_tree({"a.txt": b"a"}, ".")
    (tmp_path / "link").symlink_to(tmp_path / "elsewhere")
    with pytest.raises(BuildError, match="is a symbolic link"):
        write_tree({"a.txt": b"a"}, "link")
    with OutputLock(tmp_path / "register"), \
            pytest.raises(BuildError, match="another sdofreport run"):
        write_tree({"a.txt": b"a"}, "register")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["link"]


def test_a_planted_previous_site_is_not_restored(good_build, tmp_path, monkeypatch):
    """In a folder others may write, a "previous site" left aside by someone else (or a
    link to one) never becomes the site; one left by this user's own build does."""
    from sdofreport.site.render import recover_site

    planted = tmp_path / ".site.previous-planted" / "site"
    shutil.copytree(good_build["site"], planted)
    owner = planted.stat().st_uid
    monkeypatch.setattr(os, "getuid", lambda: owner + 12345)  # it is someone else's
    recover_site(tmp_path / "site")
    assert not (tmp_path / "site").exists()
    monkeypatch.undo()
    linked = tmp_path / ".site.previous-linked"
    linked.mkdir()
    (linked / "site").symlink_to(planted)
    shutil.move(str(planted.parent), str(tmp_path / "elsewhere"))
    (linked / "site").unlink()
    (linked / "site").symlink_to(tmp_path / "elsewhere" / "site")
    recover_site(tmp_path / "site")
    assert not (tmp_path / "site").exists()
    (linked / "site").unlink()
    shutil.move(str(tmp_path / "elsewhere" / "site"), str(linked / "site"))
    recover_site(tmp_path / "site")  # this user's own: put back
    assert snapshot(tmp_path / "site") == good_build["snapshot"]


def test_two_spellings_of_one_folder_share_one_lock(tmp_path):
    from sdofreport.errors import BuildError

    (tmp_path / "real").mkdir()
    (tmp_path / "alias").symlink_to(tmp_path / "real")
    with OutputLock(tmp_path / "real" / "site"), \
            pytest.raises(BuildError, match="another sdofreport run"):
        OutputLock(tmp_path / "alias" / "site").acquire()
