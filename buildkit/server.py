"""The static HTTP server for dist/ (`python3 build.py serve`, and the browser tests and benchmark).

It sends a file's Brotli or gzip copy (``name.br``, ``name.gz``, written by the build) with its
``Content-Encoding`` when the browser accepts that coding (Brotli first) and the copy is not older
than the file, as a static host would; the Content-Type stays the file's own (so
``.wasm`` is ``application/wasm`` either way). ETag and Last-Modified let a browser revalidate a file
it has (304). It counts the bytes it writes (``Server.bytes_sent``), which the benchmark reads.
"""

from __future__ import annotations

import email.utils
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

    def setup(self):
        super().setup()
        server = self.server
        raw = self.wfile

        class Counting:  # counts what goes on the wire
            def write(_, data):
                server.count(len(data))
                return raw.write(data)

            def __getattr__(_, name):
                return getattr(raw, name)

        self.wfile = Counting()

    def send_head(self):
        path = self.translate_path(self.path)
        if os.path.isdir(path) and self.path.split("?", 1)[0].endswith("/"):
            path = os.path.join(path, "index.html")
        if not os.path.isfile(path):
            return super().send_head()  # index.html, redirects and 404 as before
        accepts = [a.replace(" ", "") for a in self.headers.get("Accept-Encoding", "").split(",")]
        coded = None
        for coding, ext in (("br", ".br"), ("gzip", ".gz")):  # the smaller copy first
            copy = path + ext
            # a copy older than its file (the file edited after the build) is never sent
            if (any(a.split(";")[0] == coding and "q=0" not in a for a in accepts) and os.path.isfile(copy)
                    and os.stat(copy).st_mtime_ns >= os.stat(path).st_mtime_ns):
                coded = (coding, copy)
                break
        body = coded[1] if coded else path
        st = os.stat(body)
        etag = f'"{st.st_mtime_ns:x}-{st.st_size:x}{"-" + coded[0] if coded else ""}"'
        if self._unchanged(etag, st.st_mtime):
            self.send_response(304)
            self.send_header("ETag", etag)
            self.send_header("Vary", "Accept-Encoding")
            self.end_headers()
            return None
        f = open(body, "rb")
        self.send_response(200)
        self.send_header("Content-Type", self.guess_type(path))
        if coded:
            self.send_header("Content-Encoding", coded[0])
        self.send_header("Vary", "Accept-Encoding")
        self.send_header("Content-Length", str(st.st_size))
        self.send_header("ETag", etag)
        self.send_header("Last-Modified", self.date_time_string(int(st.st_mtime)))
        self.end_headers()
        return f

    def _unchanged(self, etag: str, mtime: float) -> bool:
        """The browser's copy is current: its ETag matches, or (without one) its date is not older."""
        inm = self.headers.get("If-None-Match")
        if inm is not None:
            return etag in [t.strip() for t in inm.split(",")]
        ims = self.headers.get("If-Modified-Since")
        if ims:
            try:
                return int(mtime) <= email.utils.parsedate_to_datetime(ims).timestamp()
            except (TypeError, ValueError, OverflowError):
                return False
        return False

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
    bytes_sent = 0  # headers and bodies written since start (or since the caller reset it)
    _lock = threading.Lock()

    def count(self, n: int) -> None:
        with self._lock:
            self.bytes_sent += n


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
