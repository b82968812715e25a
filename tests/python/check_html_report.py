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
5. The item and evidence tables are wider than a phone: rendered with the page's style
   sheet at 390 px they say to scroll sideways (the hint's mark colour #6b3fa0 is
   found), at 1280 px they do not.
6. Every chart of `telltale eval --format html` has a y-axis label, and it is drawn:
   one reliability chart alone is rendered with and without its label, and only the
   one with it has dark pixels in the left margin where the label stands.

With --update-docs, the two screenshots are copied to docs/img/report-phone.png and
docs/img/report-desktop.png. Without Chromium the check prints SKIPPED and passes,
except under CI (CI=true), where a missing Chromium fails it (.ci/run installs it).
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
HINT_RGB = (0x6B, 0x3F, 0xA0)  # --hint in src/report/html.rs (light scheme)
WIDTHS = {"phone": (390, 1700), "desktop": (1280, 1100)}

passed = 0
failed = 0


def running_in_ci():
    """CI sets CI=true; there a missing tool is a failure, not a skip."""
    return os.environ.get("CI", "").strip().lower() not in ("", "0", "false", "no")


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


def dark_pixels(path, x0, x1, y0, y1):
    """Pixels darker than mid-grey in the box [x0, x1) × [y0, y1)."""
    width, height, bpp, rows = read_png(path)
    n = 0
    for y in range(y0, min(y1, height)):
        row = rows[y]
        for x in range(x0, min(x1, width)):
            if all(row[x * bpp + k] < 110 for k in range(3)):
                n += 1
    return n


def check_eval_charts(binary, chromium):
    """Every evaluation chart has a y-axis label, and a rendered chart shows it."""
    tmp = tempfile.mkdtemp(prefix="telltale-eval-check-")
    cohort = os.path.join(tmp, "cohort")
    subprocess.run([binary, "synth", "cohort", "--members", "60", "--out", cohort],
                   check=True, stdout=subprocess.DEVNULL)
    page = os.path.join(tmp, "eval.html")
    subprocess.run([binary, "eval", cohort, "--folds", "2", "--public-share", "0.5",
                    "--format", "html", "-o", page], check=True, stdout=subprocess.DEVNULL,
                   stderr=subprocess.DEVNULL)
    html = open(page, encoding="utf-8").read()
    charts = re.findall(r"<svg.*?</svg>", html, re.S)
    labelled = [c for c in charts if re.search(r'<text transform="translate\([\d.]+,[\d.]+\) rotate\(-90\)"', c)]
    check(len(charts) >= 3 and len(labelled) == len(charts),
          f"every eval chart has a y-axis label ({len(labelled)} of {len(charts)})")
    reliability = next((c for c in charts if "how often guesses at each confidence" in c), None)
    check(reliability is not None, "eval has a reliability (calibration) chart")
    if reliability is None:
        return
    m = re.search(r'width="(\d+)" height="(\d+)"', reliability)
    w, h = int(m.group(1)), int(m.group(2))
    unlabelled = re.sub(r'<text transform="translate\([^"]*\) rotate\(-90\)"[^>]*>[^<]*</text>', "", reliability)
    counts = {}
    for name, svg in (("with", reliability), ("without", unlabelled)):
        chart = os.path.join(tmp, f"chart-{name}.html")
        open(chart, "w", encoding="utf-8").write(
            f'<!doctype html><html><body style="margin:0;background:#fff">{svg}</body></html>')
        png = os.path.join(tmp, f"chart-{name}.png")
        render(chromium, chart, (w, h), png, os.path.join(tmp, f"chart-{name}.json"),
               os.path.join(tmp, f"chart-profile-{name}"))
        # The label stands up the left edge, left of the percentages (x < 24).
        counts[name] = dark_pixels(png, 0, 24, 40, h - 40)
    check(counts["with"] >= 30, f"the calibration chart's y-axis label is drawn ({counts['with']} dark pixels)")
    check(counts["without"] == 0, f"control: nothing there without the label ({counts['without']})")
    shutil.rmtree(tmp, ignore_errors=True)


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
        if running_in_ci():
            check(False, "chromium is installed (CI=true: the browser part must run)")
        else:
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
    # The wide tables say to scroll on a phone, and only there: the page's own style
    # sheet with just its wide tables, so the screenshot is short enough to read.
    style = re.search(r"<head>.*?</head>", html, re.S).group(0)
    wide = re.findall(r'<div class="scroll wide">.*?</div>', html, re.S)
    check(len(wide) >= 2, f"the item and evidence tables are marked wide ({len(wide)})")
    tables = os.path.join(tmp, "wide-tables.html")
    open(tables, "w", encoding="utf-8").write(
        f"<!doctype html><html>{style}<body><main>{''.join(wide)}</main></body></html>")
    for name, width in (("phone", 390), ("desktop", 1280)):
        png = os.path.join(tmp, f"wide-{name}.png")
        render(chromium, tables, (width, 800), png, os.path.join(tmp, f"wide-{name}.json"),
               os.path.join(tmp, f"wide-profile-{name}"))
        n, _ = count_colour(png, HINT_RGB, tol=10)
        if name == "phone":
            check(n >= 40, f"phone: the wide tables say to scroll sideways ({n} hint-coloured pixels)")
        else:
            check(n == 0, f"desktop: no scroll hint where the tables fit ({n} hint-coloured pixels)")

    check_eval_charts(binary, chromium)
    print(f"check_html_report: {passed} passed, {failed} failed")
    shutil.rmtree(tmp, ignore_errors=True)
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
