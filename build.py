#!/usr/bin/env python3
"""Fieldphasor's one entry point: build dist/, serve it, run the tests, run the benchmark.

    python3 build.py serve      build, then serve dist/ on http://0.0.0.0:8000 (phones on the LAN too)
    python3 build.py test       install what the tests need, build, run every test
    python3 build.py bench      build, then measure start-up and response in Chromium (see DEVELOPERS.md)
    python3 build.py build      build dist/ only
    python3 build.py clean      remove dist/ (downloads in .cache/ are kept)
    python3 build.py setup      install what the build and the tests need (Debian packages, .venv), nothing else

The build itself needs only the Python standard library and npm (for the pinned Pyodide
tarball) and pip (for the micropip wheel). Test and benchmark tools go in .venv/.
The work is done in buildkit/, one module per job.
"""

from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys

from buildkit.assemble import build, write_service_worker  # noqa: F401  (tests call build.build)
from buildkit.common import DIST, ROOT, WEB  # noqa: F401
from buildkit.machine import CHROMIUM, ensure_debian, ensure_venv, setup  # noqa: F401
from buildkit.prerender import STATIC_SECTIONS, render_index, static_form  # noqa: F401
from buildkit.server import Handler, lan_addresses, make_server, serve_in_thread  # noqa: F401


def cmd_build(args) -> int:
    build()
    return 0


def cmd_serve(args) -> int:
    build()
    srv = make_server(DIST, args.host, args.port)
    port = srv.server_address[1]
    print(f"\nFieldphasor is being served from dist/ — open http://localhost:{port}/")
    for a in lan_addresses():
        print(f"  from a phone on the same network: http://{a}:{port}/  (see README: offline install needs HTTPS)")
    print("Ctrl+C stops the server.", flush=True)
    try:
        srv.serve_forever()
    except KeyboardInterrupt:
        pass
    return 0


def cmd_test(args) -> int:
    ensure_debian(["chromium", "ngspice"])
    py = ensure_venv()
    build()
    env = dict(os.environ, FIELDPHASOR_DIST_BUILT="1")
    return subprocess.run([py, "-m", "pytest", *args.pytest_args], cwd=ROOT, env=env).returncode


def cmd_bench(args) -> int:
    ensure_debian(["chromium"])
    py = ensure_venv()
    build()
    cmd = [py, os.path.join(ROOT, "tests", "tools", "bench.py"), "--dist", DIST, "--runs", str(args.runs)]
    if args.out:
        cmd += ["--out", args.out]
    cmd += args.bench_args  # e.g. --edits N, --installer micropip, --no-snapshot, --only-visit (see tests/tools/bench.py)
    return subprocess.run(cmd, cwd=ROOT).returncode


def cmd_clean(args) -> int:
    shutil.rmtree(DIST, ignore_errors=True)
    return 0


def cmd_setup(args) -> int:
    setup()
    return 0


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    sub = ap.add_subparsers(dest="cmd", required=True)
    sub.add_parser("build").set_defaults(fn=cmd_build)
    s = sub.add_parser("serve")
    s.add_argument("--host", default="0.0.0.0")
    s.add_argument("--port", type=int, default=8000)
    s.set_defaults(fn=cmd_serve)
    t = sub.add_parser("test")
    t.add_argument("pytest_args", nargs=argparse.REMAINDER)
    t.set_defaults(fn=cmd_test)
    b = sub.add_parser("bench")
    b.add_argument("--runs", type=int, default=9)
    b.add_argument("--out", default="")
    b.set_defaults(fn=cmd_bench)
    sub.add_parser("clean").set_defaults(fn=cmd_clean)
    sub.add_parser("setup").set_defaults(fn=cmd_setup)
    args, extra = ap.parse_known_args(argv)
    if extra and args.cmd not in ("test", "bench"):
        ap.error(f"unrecognized arguments: {' '.join(extra)}")
    if args.cmd == "test":
        args.pytest_args = extra + list(args.pytest_args)
    if args.cmd == "bench":
        args.bench_args = extra
    return args.fn(args)


if __name__ == "__main__":
    sys.exit(main())
