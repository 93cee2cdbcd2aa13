"""The static HTTP server for dist/ (`python3 build.py serve`, and the browser tests and benchmark)."""

from __future__ import annotations

import http.server
import os
import socket
import socketserver
import threading


class Handler(http.server.SimpleHTTPRequestHandler):
    extensions_map = {
        ".html": "text/html; charset=utf-8",
        ".js": "text/javascript; charset=utf-8",
        ".mjs": "text/javascript; charset=utf-8",
        ".css": "text/css; charset=utf-8",
        ".json": "application/json",
        ".webmanifest": "application/manifest+json",
        ".wasm": "application/wasm",
        ".whl": "application/zip",
        ".zip": "application/zip",
        ".png": "image/png",
        ".svg": "image/svg+xml",
        "": "application/octet-stream",
    }

    def end_headers(self):
        # Always revalidate, so a new sw.js is seen at once; the service worker does the caching.
        self.send_header("Cache-Control", "no-cache")
        self.send_header("X-Content-Type-Options", "nosniff")
        super().end_headers()

    def log_message(self, fmt, *args):  # quiet unless asked
        if os.environ.get("FIELDPHASOR_HTTP_LOG"):
            super().log_message(fmt, *args)


class Server(socketserver.ThreadingMixIn, http.server.HTTPServer):
    daemon_threads = True
    allow_reuse_address = True


def make_server(directory: str, host: str = "127.0.0.1", port: int = 0) -> Server:
    """An HTTP server for ``directory`` (port 0 = any free port); call serve_forever in a thread."""

    holder = {"dir": directory}  # tests may point a running server at another build

    def handler(*a, **kw):
        return Handler(*a, directory=holder["dir"], **kw)

    srv = Server((host, port), handler)
    srv.holder = holder
    return srv


def serve_in_thread(directory: str, host: str = "127.0.0.1", port: int = 0) -> tuple[Server, str]:
    srv = make_server(directory, host, port)
    threading.Thread(target=srv.serve_forever, daemon=True).start()
    return srv, f"http://{host}:{srv.server_address[1]}/"


def lan_addresses() -> list[str]:
    addrs = set()
    try:
        s = socket.socket(socket.AF_INET, socket.SOCK_DGRAM)
        s.connect(("192.0.2.1", 9))  # TEST-NET address: no packet is sent for UDP connect
        addrs.add(s.getsockname()[0])
        s.close()
    except OSError:
        pass
    return sorted(a for a in addrs if not a.startswith("127."))
