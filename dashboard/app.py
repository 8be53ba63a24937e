"""The Dash application and the ``heatload dashboard`` command.

``make_app(scenario_path=None)`` builds an app whose page opens the given
duty-cycle file (or the bundled default); the page also offers the bundled
examples and an upload.  The server keeps no state between requests: each
browser session holds its scenario and results in ``dcc.Store`` (memory).
"""

from __future__ import annotations

import sys
from pathlib import Path

from dash import Dash
from dash.exceptions import DependencyException

from . import callbacks, layout, logfit_view
from heatload import io
from heatload.errors import HeatloadError, printable

LOOPBACK = ("127.0.0.1", "localhost", "::1")

#: Headers on every answer.  The page loads nothing from another origin and may not
#: be framed (clickjacking); Dash's renderer starts from an inline script and
#: plotly styles elements inline, hence 'unsafe-inline' for those two only.
SECURITY_HEADERS = {
    "Content-Security-Policy": (
        "default-src 'self'; script-src 'self' 'unsafe-inline' 'unsafe-eval'; "
        "style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; "
        "font-src 'self' data:; connect-src 'self'; object-src 'none'; "
        "base-uri 'self'; form-action 'self'; frame-ancestors 'none'"),
    "X-Content-Type-Options": "nosniff",
    "X-Frame-Options": "DENY",
    "Referrer-Policy": "no-referrer",
}


#: What the app serves: Dash's own routes, its scripts and the assets folder.
SERVED_PREFIXES = ("/_dash-", "/_favicon.ico", "/assets/", "/_reload-hash")
UPDATE_ROUTE = "/_dash-update-component"
#: Exceptions a malformed callback request raises inside the framework or a callback
#: (RecursionError: a body nested too deep for the JSON reader).
_CLIENT_ERRORS = (KeyError, TypeError, ValueError, IndexError, AttributeError, RecursionError)


def _harden(server) -> None:
    """Security headers on every answer; a request for a file the app does not
    serve (e.g. a path-traversal attempt) is a 404, not a server error."""

    @server.after_request
    def _headers(response):
        for name, value in SECURITY_HEADERS.items():
            response.headers.setdefault(name, value)
        return response

    def _not_found(_error):
        return "not found", 404

    server.register_error_handler(DependencyException, _not_found)

    from flask import request
    from werkzeug.exceptions import HTTPException

    @server.before_request
    def _only_what_the_app_serves():
        # Dash answers every other path with its page (for page routing, which
        # this app does not use): a path it does not serve is a 404
        path = request.path
        if path == "/" or path.startswith(SERVED_PREFIXES):
            if path == UPDATE_ROUTE and request.method != "POST":
                return "method not allowed", 405
            return None
        return "not found", 404

    def _bad_request(error):
        # a callback request the page itself never sends (a body without its
        # outputs, text where a number belongs, a table row that is no row):
        # a client error, answered in one line, never a traceback
        if isinstance(error, HTTPException):
            return error
        if request.path == UPDATE_ROUTE and isinstance(error, _CLIENT_ERRORS):
            server.logger.warning("refused a malformed callback request: %s: %s",
                                  type(error).__name__, str(error)[:200])
            return "bad request", 400
        server.logger.error("internal error: %s: %s", type(error).__name__, str(error)[:200])
        return "internal error", 500

    server.register_error_handler(Exception, _bad_request)


def scenario_choices(scenario_path=None):
    """``(options, value, examples)``: the picker's options, the value opened
    first and the map from values to files (the only paths the server reads)."""
    examples = {}
    options = []
    if scenario_path is not None:
        p = Path(scenario_path)
        examples["file"] = p
        options.append({"label": f"{p.name} (opened file)", "value": "file"})
    for p in io.example_paths():
        key = f"example:{p.stem}"
        examples[key] = p
        options.append({"label": f"{p.stem.replace('_', ' ')} (example)", "value": key})
    if scenario_path is not None:
        value = "file"
    else:
        default = Path(io.default_scenario_path()).resolve()
        value = next((k for k, p in examples.items() if p.resolve() == default),
                     options[0]["value"] if options else None)
    return options, value, examples


def make_app(scenario_path=None) -> Dash:
    """Build the dashboard for *scenario_path* (default: the bundled default).

    Raises :class:`HeatloadError` when the file cannot be read or is invalid,
    before any server starts.
    """
    options, value, examples = scenario_choices(scenario_path)
    path = examples[value] if value else Path(io.default_scenario_path())
    scenario = io.load_scenario(path)
    data = io.scenario_to_dict(scenario)
    initial = {"data": data, "source": path.name, "options": options, "value": value,
               "system": "si", "note": ""}
    app = Dash(__name__, title="heatload dashboard", update_title=None,
               suppress_callback_exceptions=False, serve_locally=True)
    app.index_string = layout.INDEX
    app.server.config["MAX_CONTENT_LENGTH"] = layout.MAX_REQUEST_BYTES
    _harden(app.server)
    # a function: every page load starts a fresh session from the opened file
    app.layout = lambda: layout.make_layout(initial)
    callbacks.register(app, examples)
    logfit_view.register(app)
    return app


#: Bounds of ``--threads``: one is enough for one person; past 64 the two or
#: four cores of a typical server only queue the work.
THREADS = (1, 64)


def serve(app, host="127.0.0.1", port=8050, threads=8):
    """Serve *app* with waitress, a production WSGI server in pure Python (no
    compiler, runs on Windows and Linux alike).  The server holds no session
    state (every browser keeps its scenario and results in the page), so any
    number of people share one process; *threads* bounds how many recomputes
    run at once."""
    make_server(app, host, port, threads).run()


def make_server(app, host="127.0.0.1", port=8050, threads=8):
    """The waitress server of :func:`serve`, bound but not yet running
    (``.run()`` serves until stopped, ``.close()`` stops; port 0 picks a free one)."""
    from waitress import create_server
    return create_server(app.server, host=host, port=port, threads=threads,
                         ident="heatload", max_request_body_size=layout.MAX_REQUEST_BYTES)


def _check_address(host, port):
    """Refuse, before anything starts, an address this machine cannot serve on:
    a host that is not one of its addresses, or a port another program holds."""
    import socket
    try:
        family, kind, proto, _, addr = socket.getaddrinfo(host, port,
                                                           type=socket.SOCK_STREAM)[0]
    except (OSError, UnicodeError, ValueError) as exc:
        raise HeatloadError(f"cannot serve on {printable(str(host))!r}: not an address of this "
                            f"machine ({printable(str(exc))})", field="--host") from None
    with socket.socket(family, kind, proto) as probe:
        probe.setsockopt(socket.SOL_SOCKET, socket.SO_REUSEADDR, 1)
        try:
            probe.bind(addr)
        except OSError as exc:
            raise HeatloadError(f"cannot serve on {host}:{port}: {exc.strerror or exc} "
                                f"(another program may hold the port: give --port N)",
                                field="--port") from None


def run_cli(args) -> int:
    """``heatload dashboard [FILE] [--port N] [--host H] [--threads N] [--debug]``."""
    file = getattr(args, "file", None) or getattr(args, "scenario", None)
    host = getattr(args, "host", None) or "127.0.0.1"
    port = getattr(args, "port", None)
    port = 8050 if port is None else int(port)     # 0 is refused below, not 8050
    threads = getattr(args, "threads", None)
    threads = 8 if threads is None else int(threads)
    debug = bool(getattr(args, "debug", False))
    if not 0 < port < 65536:
        raise HeatloadError(f"expected a port 1..65535, got {port}", field="--port")
    if not THREADS[0] <= threads <= THREADS[1]:
        raise HeatloadError(f"expected {THREADS[0]}..{THREADS[1]} threads, got {threads}",
                            field="--threads")
    _check_address(host, port)
    app = make_app(file)
    if host not in LOOPBACK:
        print(f"warning: serving on {host}: the dashboard is reachable from other machines "
              "on that network; it has no login.", file=sys.stderr)
    print(f"heatload dashboard on http://{host}:{port}/  (Ctrl+C stops it)", file=sys.stderr)
    if debug:
        # the framework's debugger runs code sent to it: never beyond this machine
        if host not in LOOPBACK:
            raise HeatloadError("--debug serves the framework's debugger, which runs code "
                                "sent to it: only on 127.0.0.1", field="--debug")
        app.run(host=host, port=port, debug=debug)
    else:
        serve(app, host, port, threads)
    return 0
