"""A LAN bench meter on the loopback: a tiny SCPI responder for tests and hand checks.

Listens on 127.0.0.1 only (never another address) and answers one line per query, the way
a SCPI meter's raw socket port does (resource ``TCPIP0::127.0.0.1::PORT::SOCKET``):
``*IDN?``, ``MEAS:VOLT:DC?``, ``MEAS:VOLT:AC?``, ``MEAS:RES?``, ``MEAS:CURR:DC?``,
``MEAS:CURR:AC?``, ``MEAS:FREQ?``, ``FUNC?`` and ``READ?``; anything else gets no answer
and ``SYST:ERR?`` then says ``-113,"Undefined header"``. With ``drift`` each quantity
starts off by ``drift`` (a fraction) and settles geometrically (x0.3 per reading), like a
reading on a charging capacitor. ``mute`` makes it stop answering (a meter unplugged); in a
terminal, ``kill -STOP`` on the process does the same for real.

    python tests/meter_server.py --port 5025 [--drift 0.02]
"""

from __future__ import annotations

import argparse
import socketserver
import threading

IDN = "Demo Instruments,DMM-45 on loopback,LAN0001,0.1"
DEFAULTS = {"MEAS:VOLT:DC?": 122.4, "MEAS:VOLT:AC?": 118.5, "MEAS:RES?": 470.0,
            "MEAS:CURR:DC?": 0.0045, "MEAS:CURR:AC?": 0.15, "MEAS:FREQ?": 455000.0}


class _Handler(socketserver.StreamRequestHandler):
    def handle(self) -> None:
        server = self.server
        for raw in self.rfile:
            query = raw.decode("ascii", "replace").strip().upper()
            if not query:
                continue
            if server.mute.is_set():
                continue
            answer = server.answer(query)
            if answer is not None:
                self.wfile.write((answer + "\n").encode("ascii"))
                self.wfile.flush()


class MeterServer(socketserver.ThreadingTCPServer):
    daemon_threads = True
    allow_reuse_address = True

    def __init__(self, port: int = 0, values: dict | None = None, drift: float = 0.0) -> None:
        super().__init__(("127.0.0.1", port), _Handler)
        self.values = dict(DEFAULTS if values is None else values)
        self.drift = drift
        self.counts: dict[str, int] = {}
        self.function = "MEAS:VOLT:DC?"
        self.error = "+0,\"No error\""
        self.mute = threading.Event()
        self.lock = threading.Lock()

    @property
    def resource(self) -> str:
        return f"TCPIP0::127.0.0.1::{self.server_address[1]}::SOCKET"

    def answer(self, query: str) -> str | None:
        with self.lock:
            if query == "*IDN?":
                return IDN
            if query == "SYST:ERR?":
                error, self.error = self.error, "+0,\"No error\""
                return error
            if query == "FUNC?":
                return '"' + self.function.removeprefix("MEAS:").rstrip("?") + '"'
            if query == "READ?":
                query = self.function
            if query in self.values:
                k = self.counts.get(query, 0)
                self.counts[query] = k + 1
                value = self.values[query] * (1 + self.drift * 0.3 ** k)
                return f"{value:+.8E}"
            self.error = "-113,\"Undefined header\""
            return None

    def start(self) -> MeterServer:
        threading.Thread(target=self.serve_forever, daemon=True).start()
        return self


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--port", type=int, default=5025)
    parser.add_argument("--drift", type=float, default=0.0)
    args = parser.parse_args()
    server = MeterServer(args.port, drift=args.drift)
    print(f"meter on {server.resource}", flush=True)
    server.serve_forever()


if __name__ == "__main__":
    main()
