"""Check the HTML report as a browser sees it (headless Chromium, Debian's package).

1. `telltale scan --format html` on the demo reporter archive.
2. The file is self-contained: a Content-Security-Policy meta that forbids loading
   anything (default-src 'none'), no scripts, no external URLs in src/href/url().
3. Chromium renders it at phone (390 px) and desktop (1280 px) widths with a network
   log (--log-net-log) and every host name resolving to nothing. A control page
   WITHOUT the policy loads an image from an invented .invalid host: the log must
   show it (so the check can fail), and tells which traffic annotation Chromium gives
   requests made by page content (the browser's own update and time checks carry
   other annotations and are ignored). The same page WITH our policy must not load
   it, and the report itself must make no request with that annotation.
4. The charts are visible: the screenshots contain the chart bar colour (#2f5d8a).

With --update-docs, the two screenshots are copied to docs/img/report-phone.png and
docs/img/report-desktop.png. Without Chromium the check prints SKIPPED and passes
(CI installs it in .ci/run).
"""
import os
import re
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
BAR_RGB = (0x2F, 0x5D, 0x8A)  # --bar in src/report/html.rs (light scheme)
WIDTHS = {"phone": (390, 1700), "desktop": (1280, 1100)}

passed = 0
failed = 0


def check(ok, what):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print(f"FAILED: {what}")


def read_png(path):
    """Decode an 8-bit RGB/RGBA non-interlaced PNG (what Chromium writes) into rows."""
    data = open(path, "rb").read()
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG"
    pos, idat = 8, b""
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos : pos + 4])
        kind = data[pos + 4 : pos + 8]
        body = data[pos + 8 : pos + 8 + length]
        if kind == b"IHDR":
            width, height, depth, colour, _, _, interlace = struct.unpack(">IIBBBBB", body)
            assert depth == 8 and colour in (2, 6) and interlace == 0, "unsupported PNG"
            bpp = 3 if colour == 2 else 4
        elif kind == b"IDAT":
            idat += body
        pos += 12 + length
    raw = zlib.decompress(idat)
    stride = width * bpp
    rows, prev = [], bytearray(stride)
    for y in range(height):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1 : (y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if f == 1:
                line[i] = (line[i] + a) & 0xFF
            elif f == 2:
                line[i] = (line[i] + b) & 0xFF
            elif f == 3:
                line[i] = (line[i] + (a + b) // 2) & 0xFF
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pr = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[i] = (line[i] + pr) & 0xFF
        rows.append(bytes(line))
        prev = line
    return width, height, bpp, rows


def count_colour(path, rgb, tol=6):
    width, height, bpp, rows = read_png(path)
    n = 0
    for row in rows:
        for x in range(0, width * bpp, bpp):
            if all(abs(row[x + k] - rgb[k]) <= tol for k in range(3)):
                n += 1
    return n, width


def chromium_binary():
    for name in ("chromium", "chromium-browser"):
        path = shutil.which(name)
        if path:
            return path
    return None


def render(chromium, html_path, size, png, netlog, profile):
    w, h = size
    cmd = [
        chromium,
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--hide-scrollbars",
        "--no-first-run",
        "--no-default-browser-check",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--disable-default-apps",
        "--no-pings",
        "--force-device-scale-factor=1",
        "--host-resolver-rules=MAP * ~NOTFOUND",
        f"--user-data-dir={profile}",
        f"--log-net-log={netlog}",
        "--net-log-capture-mode=Everything",
        f"--window-size={w},{h}",
        "--virtual-time-budget=3000",
        f"--screenshot={png}",
        "file://" + html_path,
    ]
    subprocess.run(cmd, check=True, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, timeout=120)


def requests(netlog):
    """(traffic annotation, url) of every URL request in a Chromium net log, leaving
    out local schemes."""
    text = open(netlog, encoding="utf-8", errors="replace").read()
    found = set()
    for m in re.finditer(r'"traffic_annotation":(\d+),"url":"([^"]+)"', text):
        url = m.group(2)
        if not url.startswith(("file:", "data:", "chrome:", "about:", "devtools:")):
            found.add((int(m.group(1)), url))
    return found


def main():
    update_docs = "--update-docs" in sys.argv
    binary = os.environ.get("TELLTALE_BIN", os.path.join(ROOT, "target/release/telltale"))
    tmp = tempfile.mkdtemp(prefix="telltale-html-")
    report = os.path.join(tmp, "report.html")
    subprocess.run(
        [binary, "scan", os.path.join(ROOT, "demo-exports/reporter"), "--format", "html", "-o", report],
        check=True,
    )
    html = open(report, encoding="utf-8").read()

    # Static: self-contained.
    csp = re.search(r'<meta http-equiv="Content-Security-Policy" content="([^"]+)"', html)
    check(csp is not None and "default-src 'none'" in csp.group(1), "CSP meta with default-src 'none'")
    check("<script" not in html.lower(), "no script element")
    check(not re.search(r'(src|href)\s*=\s*["\']?(https?:)?//', html, re.I), "no external src/href")
    check("url(" not in html and "@import" not in html, "no url() or @import in styles")
    check(html.count("<svg") >= 4, "one SVG chart per attribute")
    mode = os.stat(report).st_mode & 0o777
    check(mode == 0o600, f"report written owner-only (mode {oct(mode)})")

    chromium = chromium_binary()
    if chromium is None:
        print("SKIPPED browser part of check_html_report: chromium is not installed")
        print(f"{passed} passed, {failed} failed")
        return 1 if failed else 0

    # Control pages: the network log must see an unblocked request, and our policy
    # must block it.
    probe = '<img src="http://telltale-check.invalid/probe.png" alt="">'
    page_annotation = None
    for with_policy in (False, True):
        page = os.path.join(tmp, f"control-{with_policy}.html")
        head = (
            '<meta http-equiv="Content-Security-Policy" content="'
            + (csp.group(1) if csp else "")
            + '">'
            if with_policy
            else ""
        )
        open(page, "w").write(f"<!doctype html><html><head>{head}</head><body>{probe}</body></html>")
        log = os.path.join(tmp, f"control-{with_policy}.json")
        render(chromium, page, (400, 300), os.path.join(tmp, "c.png"), log, os.path.join(tmp, f"p{with_policy}"))
        probe_requests = [r for r in requests(log) if "telltale-check.invalid" in r[1]]
        seen = bool(probe_requests)
        if not with_policy and probe_requests:
            # The annotation Chromium gives requests made by page content; the
            # browser's own background requests (updates, time) carry others.
            page_annotation = probe_requests[0][0]
        if with_policy:
            check(not seen, "our Content-Security-Policy blocks an outside image")
        else:
            check(seen, "the network log records a request from a page (control)")

    for name, size in WIDTHS.items():
        png = os.path.join(tmp, f"report-{name}.png")
        log = os.path.join(tmp, f"net-{name}.json")
        render(chromium, report, size, png, log, os.path.join(tmp, f"profile-{name}"))
        urls = sorted(u for a, u in requests(log) if a == page_annotation)
        check(page_annotation is not None and not urls, f"{name}: the page requests nothing (saw {urls[:5]})")
        n, width = count_colour(png, BAR_RGB)
        check(width == size[0], f"{name}: screenshot is {size[0]} px wide (got {width})")
        # At least the four attributes' top bars, each several hundred pixels.
        check(n > 2000, f"{name}: chart bars visible ({n} bar-coloured pixels)")
        if update_docs:
            os.makedirs(os.path.join(ROOT, "docs/img"), exist_ok=True)
            shutil.copy(png, os.path.join(ROOT, f"docs/img/report-{name}.png"))
    print(f"check_html_report: {passed} passed, {failed} failed")
    shutil.rmtree(tmp, ignore_errors=True)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
