"""buildkit.machine: the machine set-up that `python3 build.py setup`, the other commands and CI share."""

import os
import re
import subprocess

import pytest

from buildkit import machine
from helpers import ROOT


@pytest.fixture
def apt(monkeypatch):
    """Record the commands ensure_debian would run, on a machine missing 'ngspice' only."""
    calls = []
    monkeypatch.setattr(machine, "DEBIAN_PACKAGES", {"ngspice": lambda: False, "npm": lambda: True})
    monkeypatch.setattr(machine.shutil, "which", lambda name: "/usr/bin/" + name)
    monkeypatch.setattr(machine.subprocess, "run", lambda cmd, **kw: calls.append((cmd, kw.get("env") or {})))
    return calls


def test_as_root_updates_the_package_lists_then_installs_only_what_is_missing(apt, monkeypatch):
    monkeypatch.setattr(machine.os, "geteuid", lambda: 0)
    machine.ensure_debian(["ngspice", "npm"])
    assert [cmd[:2] for cmd, _ in apt] == [["apt-get", "update"], ["apt-get", "install"]]
    assert apt[1][0][-1] == "ngspice" and "npm" not in apt[1][0]
    assert all(env.get("DEBIAN_FRONTEND") == "noninteractive" for _, env in apt)


def test_nothing_runs_when_nothing_is_missing(apt, monkeypatch):
    monkeypatch.setattr(machine.os, "geteuid", lambda: 0)
    machine.ensure_debian(["npm"])
    assert apt == []


def test_without_root_it_stops_with_the_one_line_to_run(apt, monkeypatch):
    monkeypatch.setattr(machine.os, "geteuid", lambda: 1000)
    with pytest.raises(SystemExit) as stop:
        machine.ensure_debian(["ngspice", "npm"])
    assert "sudo apt-get install -y ngspice" in str(stop.value)
    assert apt == []


def test_ci_uses_the_project_set_up_then_exactly_the_readme_test_command():
    ci = open(os.path.join(ROOT, ".ci", "run"), encoding="utf-8").read()
    commands = [ln.strip() for ln in ci.splitlines() if ln.strip().startswith("python3 ")]
    assert commands == ["python3 build.py setup", "python3 build.py test"]
    readme = open(os.path.join(ROOT, "README.md"), encoding="utf-8").read()
    assert re.search(r"```sh\npython3 build.py test\n```", readme)
    # the package list lives in buildkit/machine.py alone
    for package in machine.DEBIAN_PACKAGES:
        assert package not in ci, package


def test_setup_command_is_known_to_the_cli():
    out = subprocess.run(["python3", os.path.join(ROOT, "build.py"), "--help"], capture_output=True, text=True, check=True)
    for cmd in ("build", "serve", "test", "bench", "clean", "setup"):
        assert cmd in out.stdout
