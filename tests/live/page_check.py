#!/usr/bin/env python3
"""Loads the live page in headless Chromium, waits for a zone's margin, publishes a new
reading, waits until the page shows the new margin, and saves a screenshot.

Drives Chromium through the DevTools protocol over a WebSocket written here with the
standard library only (RFC 6455 client framing), so the test needs no npm package.
Exit codes: 0 passed, 1 failed (the reason on stdout), 77 skipped (no browser).
"""
import argparse
import base64
import json
import os
import shutil
import signal
import socket
import struct
import subprocess
import sys
import time
import urllib.request


class WebSocket:
    def __init__(self, url, timeout_s):
        assert url.startswith("ws://")
        rest = url[len("ws://"):]
        hostport, path = rest.split("/", 1)
        host, port = hostport.rsplit(":", 1)
        self.sock = socket.create_connection((host, int(port)), timeout=timeout_s)
        key = base64.b64encode(os.urandom(16)).decode()
        request = (f"GET /{path} HTTP/1.1\r\nHost: {hostport}\r\nUpgrade: websocket\r\nConnection: Upgrade\r\n"
                   f"Sec-WebSocket-Key: {key}\r\nSec-WebSocket-Version: 13\r\n\r\n")
        self.sock.sendall(request.encode())
        head = b""
        while b"\r\n\r\n" not in head:
            chunk = self.sock.recv(4096)
            if not chunk:
                raise RuntimeError("the browser closed the DevTools connection during the handshake")
            head += chunk
        head, self.buffer = head.split(b"\r\n\r\n", 1)
        if b" 101 " not in head.split(b"\r\n", 1)[0]:
            raise RuntimeError("DevTools handshake refused: " + head.decode(errors="replace"))

    def send_text(self, text):
        data = text.encode()
        header = bytearray([0x81])
        n = len(data)
        if n < 126:
            header.append(0x80 | n)
        elif n < 65536:
            header.append(0x80 | 126)
            header += struct.pack("!H", n)
        else:
            header.append(0x80 | 127)
            header += struct.pack("!Q", n)
        mask = os.urandom(4)
        header += mask
        self.sock.sendall(bytes(header) + bytes(b ^ mask[i % 4] for i, b in enumerate(data)))

    def _read(self, n):
        while len(self.buffer) < n:
            chunk = self.sock.recv(65536)
            if not chunk:
                raise RuntimeError("the browser closed the DevTools connection")
            self.buffer += chunk
        out, self.buffer = self.buffer[:n], self.buffer[n:]
        return out

    def receive_text(self):
        message = b""
        while True:
            b0, b1 = self._read(2)
            opcode = b0 & 0x0F
            n = b1 & 0x7F
            if n == 126:
                n = struct.unpack("!H", self._read(2))[0]
            elif n == 127:
                n = struct.unpack("!Q", self._read(8))[0]
            mask = self._read(4) if b1 & 0x80 else None
            payload = self._read(n)
            if mask:
                payload = bytes(b ^ mask[i % 4] for i, b in enumerate(payload))
            if opcode == 0x8:
                raise RuntimeError("the browser closed the DevTools connection")
            if opcode == 0x9:  # ping: answer with the same payload
                self.sock.sendall(bytes([0x8A, 0x80 | len(payload)]) + b"\0\0\0\0" + payload)
                continue
            if opcode in (0x1, 0x0):
                message += payload
                if b0 & 0x80:
                    return message.decode()


class DevTools:
    def __init__(self, ws):
        self.ws = ws
        self.next_id = 0

    def call(self, method, **params):
        self.next_id += 1
        my_id = self.next_id
        self.ws.send_text(json.dumps({"id": my_id, "method": method, "params": params}))
        while True:
            reply = json.loads(self.ws.receive_text())
            if reply.get("id") == my_id:
                if "error" in reply:
                    raise RuntimeError(f"{method}: {reply['error']}")
                return reply.get("result", {})

    def text_of(self, selector):
        expression = f"(() => {{ const e = document.querySelector({json.dumps(selector)}); return e ? e.textContent : null; }})()"
        result = self.call("Runtime.evaluate", expression=expression, returnByValue=True)
        return result.get("result", {}).get("value")

    def wait_for(self, what, check, timeout_s):
        until = time.monotonic() + timeout_s
        last = None
        while time.monotonic() < until:
            last = check()
            if last:
                return last
            time.sleep(0.2)
        raise RuntimeError(f"timed out after {timeout_s} s waiting for {what} (last seen: {last!r})")

    def screenshot(self, path, width, height, mobile):
        self.call("Emulation.setDeviceMetricsOverride", width=width, height=height, deviceScaleFactor=1, mobile=mobile)
        time.sleep(0.5)  # one layout pass after the resize
        data = self.call("Page.captureScreenshot", format="png")["data"]
        with open(path, "wb") as f:
            f.write(base64.b64decode(data))


def start_browser(chromium, work_dir):
    profile = os.path.join(work_dir, "chromium-profile")
    shutil.rmtree(profile, ignore_errors=True)
    os.makedirs(profile)
    args = [chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
            "--disable-component-update", "--disable-sync", "--no-first-run", "--no-default-browser-check",
            "--disable-extensions", "--remote-debugging-address=127.0.0.1", "--remote-debugging-port=0",
            f"--user-data-dir={profile}", "about:blank"]
    log = open(os.path.join(work_dir, "chromium.log"), "wb")
    proc = subprocess.Popen(args, stdout=log, stderr=log, start_new_session=True)
    port_file = os.path.join(profile, "DevToolsActivePort")
    until = time.monotonic() + 30
    while time.monotonic() < until:
        if proc.poll() is not None:
            raise RuntimeError(f"chromium exited with {proc.returncode}; see {log.name}")
        if os.path.exists(port_file):
            lines = open(port_file).read().split()
            if len(lines) >= 2:
                return proc, int(lines[0])
        time.sleep(0.1)
    raise RuntimeError("chromium did not open its DevTools port within 30 s")


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--chromium", default="/usr/bin/chromium")
    p.add_argument("--url", required=True)
    p.add_argument("--zone", required=True)
    p.add_argument("--publish-port", type=int)
    p.add_argument("--publish-topic")
    p.add_argument("--publish-payload")
    p.add_argument("--expect-margin")
    p.add_argument("--screenshot", required=True)
    p.add_argument("--phone-screenshot")
    p.add_argument("--width", type=int, default=1100)
    p.add_argument("--height", type=int, default=520)
    p.add_argument("--work-dir", required=True)
    a = p.parse_args()
    if not (os.path.exists(a.chromium) and os.access(a.chromium, os.X_OK)):
        print(f"skipped: no browser at {a.chromium}")
        return 77
    signal.alarm(55)  # the whole check is bounded
    proc = None
    try:
        proc, port = start_browser(a.chromium, a.work_dir)
        req = urllib.request.Request(f"http://127.0.0.1:{port}/json/new?about:blank", method="PUT")
        target = json.load(urllib.request.urlopen(req, timeout=10))
        tools = DevTools(WebSocket(target["webSocketDebuggerUrl"], 20))
        tools.call("Page.enable")
        tools.call("Emulation.setDeviceMetricsOverride", width=a.width, height=a.height, deviceScaleFactor=1,
                   mobile=False)
        tools.call("Page.navigate", url=a.url)
        selector = f'tr[data-zone="{a.zone}"] td.margin'
        before = tools.wait_for(f"the margin of {a.zone}", lambda: (lambda t: t if t and t != "–" else None)(
            tools.text_of(selector)), 15)
        if a.publish_topic:
            subprocess.run(["mosquitto_pub", "-h", "127.0.0.1", "-p", str(a.publish_port), "-q", "1", "-t",
                            a.publish_topic, "-m", a.publish_payload], check=True, timeout=10)
        if a.expect_margin:
            tools.wait_for(f"margin {a.expect_margin} of {a.zone}", lambda: tools.text_of(selector) == a.expect_margin,
                           15)
        print(f"margin of {a.zone} went from {before} to {tools.text_of(selector)}")
        tools.screenshot(a.screenshot, a.width, a.height, False)
        if a.phone_screenshot:
            tools.screenshot(a.phone_screenshot, 390, 700, True)
        return 0
    except Exception as e:  # one line for the test's failure message
        print(f"page check failed: {e}")
        return 1
    finally:
        if proc is not None:
            try:
                os.killpg(proc.pid, signal.SIGKILL)
            except ProcessLookupError:
                pass
            proc.wait(timeout=10)


if __name__ == "__main__":
    sys.exit(main())
