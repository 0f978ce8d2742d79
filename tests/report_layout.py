"""Layout checks of report documents, as a reader sees them (used by tests/test_report.sh).

    report_layout.py inject REPORT.html OUT.html
        a copy of the page with a small measuring script (the report itself has none)
    report_layout.py html DUMP.html NAME...
        reads the measurements Chromium left in the dumped DOM: the page and the key table
        fit the window's width, the answer and the key table's first row are above the fold,
        every NAME is a row of the key table, figures are shown at their natural size
    report_layout.py pdf BBOX.html TEXT.txt PAGE.pgm... -- NAME...
        pdftotext -bbox words, pdftotext -raw text and pdftoppm -gray pages: nothing beyond the right margin, the key
        table on page 1 with every NAME whole, each table on one page, no cut names (no
        ellipsis), the last page not almost empty
Exit 0 when every check passes, else 1 with the failures on stdout.
"""
import json
import re
import sys

MEASURE = r"""<script>
window.addEventListener('load', function () {
  var r = {vw: window.innerWidth, vh: window.innerHeight,
           scroll: document.documentElement.scrollWidth};
  function box(el) { var b = el.getBoundingClientRect();
    return {left: b.left, right: b.right, top: b.top, bottom: b.bottom}; }
  var key = document.querySelector('table.key');
  var ans = document.getElementById('answer');
  if (key) {
    r.key = box(key);
    r.heads = Array.prototype.map.call(key.querySelectorAll('th'), function (h) {
      var b = box(h); b.text = h.textContent; return b; });
    var rows = key.querySelectorAll('tbody tr');
    r.first_row = rows.length ? box(rows[0]) : null;
    r.names = Array.prototype.map.call(rows, function (tr) {
      return tr.cells[0].textContent; });
    r.links = Array.prototype.map.call(key.querySelectorAll('tbody a'), function (a) {
      var id = a.getAttribute('href').slice(1);
      return document.getElementById(id) ? id : null; });
  }
  if (ans) r.answer = box(ans);
  r.figs = Array.prototype.map.call(document.querySelectorAll('figure svg'), function (s) {
    return [s.getBoundingClientRect().width, s.viewBox.baseVal.width]; });
  var pre = document.createElement('pre');
  pre.id = 'embz-layout';
  pre.textContent = JSON.stringify(r);
  document.body.appendChild(pre);
});
</script>"""


def inject(src, dst):
    text = open(src, encoding="utf-8").read()
    assert "</head>" in text
    open(dst, "w", encoding="utf-8").write(text.replace("</head>", MEASURE + "</head>", 1))
    return []


def html(dump, names):
    text = open(dump, encoding="utf-8").read()
    m = re.search(r'<pre id="embz-layout">(.*?)</pre>', text, re.S)
    if not m:
        return ["no measurements in the dumped page"]
    r = json.loads(m.group(1).replace("&quot;", '"').replace("&amp;", "&")
                   .replace("&lt;", "<").replace("&gt;", ">"))
    bad = []
    print("window %(vw)d x %(vh)d, page scroll width %(scroll)d" % r)
    if r["scroll"] > r["vw"]:
        bad.append("the page scrolls sideways: %d > %d" % (r["scroll"], r["vw"]))
    if "key" not in r:
        return bad + ["no key table"]
    k = r["key"]
    print("key table: x %.0f..%.0f (width %.0f), y %.0f..%.0f" %
          (k["left"], k["right"], k["right"] - k["left"], k["top"], k["bottom"]))
    if k["left"] < 0 or k["right"] > r["vw"]:
        bad.append("key table outside the window: %.0f..%.0f" % (k["left"], k["right"]))
    for h in r["heads"]:
        if h["right"] > r["vw"]:
            bad.append("column '%s' off-screen at x = %.0f" % (h["text"], h["right"]))
    if "answer" not in r:
        bad.append("no answer")
    elif r["answer"]["bottom"] > r["vh"]:
        bad.append("answer below the fold: %.0f > %d" % (r["answer"]["bottom"], r["vh"]))
    if r["first_row"] is None or r["first_row"]["bottom"] > r["vh"]:
        bad.append("the key table's first row is below the fold")
    if None in r["links"] or len(r["links"]) != len(r["names"]):
        bad.append("a name of the key table links nowhere: %s" % r["links"])
    # figures at their natural size (their text was drawn for it: tick labels of about
    # 13 px), not shrunk to fit
    for k, (shown, natural) in enumerate(r["figs"]):
        print("figure %d: %.0f px shown, %.0f natural" % (k + 1, shown, natural))
        if shown < 0.98 * natural:
            bad.append("figure %d shrunk to %.0f of %.0f px" % (k + 1, shown, natural))
    if not r["figs"]:
        bad.append("no figure")
    for n in names:
        if n not in r["names"]:
            bad.append("family %s not a row of the key table (%s)" % (n, r["names"]))
    return bad


def read_pgm(path):
    data = open(path, "rb").read()
    parts = data.split(maxsplit=4)
    assert parts[0] == b"P5", path
    w, h, maxv = int(parts[1]), int(parts[2]), int(parts[3])
    return w, h, parts[4][: w * h]


def pdf(bbox, text, pgms, names):
    bad = []
    pages = re.findall(r'<page width="([\d.]+)" height="([\d.]+)">(.*?)</page>',
                       open(bbox, encoding="utf-8").read(), re.S)
    words = []
    for i, (pw, ph, body) in enumerate(pages):
        for x0, y0, x1, y1, w in re.findall(
                r'<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">'
                r'(.*?)</word>', body):
            words.append((i, float(x0), float(y0), float(x1), float(y1), w))
    pw, ph = float(pages[0][0]), float(pages[0][1])
    print("%d pages of %.0f x %.0f pt, %d words" % (len(pages), pw, ph, len(words)))
    # every word inside the margins (36 pt; the text width ends at 50 pt)
    for i, x0, y0, x1, y1, w in words:
        if x0 < 36 or x1 > pw - 36 or y1 > ph - 30:
            bad.append("page %d: '%s' beyond the margin (x %.0f..%.0f, y %.0f)" %
                       (i + 1, w, x0, x1, y1))
    # the rendered pages: the right margin strip is blank
    for k, path in enumerate(pgms):
        w, h, px = read_pgm(path)
        strip = int(w * 36 / pw)
        dark = sum(1 for y in range(h) for x in range(w - strip, w) if px[y * w + x] < 200)
        if dark:
            bad.append("page %d: %d dark pixels in the right margin" % (k + 1, dark))
    # the last page is not almost empty
    if len(pages) > 1:
        last = [y1 for i, x0, y0, x1, y1, w in words if i == len(pages) - 1]
        fill = (max(last) - 50) / (ph - 100) if last else 0
        print("last page filled to %.0f%%" % (100 * fill))
        if fill < 0.15:
            bad.append("the last page is almost empty (%.0f%%)" % (100 * fill))
    # names whole in the text (cells wrap, they are never cut)
    raw = open(text, encoding="utf-8").read()
    flat = " ".join(raw.split())
    if "\u2026" in raw:
        bad.append("an ellipsis in the text: something was cut")
    page1 = " ".join(w for i, x0, y0, x1, y1, w in words if i == 0)
    for n in names:
        if n not in flat:
            bad.append("family name '%s' not whole in the text" % n)
        if n.split(" ")[0] not in page1:
            bad.append("family '%s' not on page 1 (the key table)" % n)
    # each table on one page: every table starts with a head 'family' and ends with the row
    # 'optimal state', both in the first cell (x = 54 pt); a page holds as many of one as of
    # the other
    for i in range(len(pages)):
        cell = [w for j, x0, y0, x1, y1, w in words if j == i and 53 <= x0 <= 56]
        heads, lasts = cell.count("family"), cell.count("optimal")
        if heads != lasts:
            bad.append("page %d: %d table heads but %d last rows: a table is split" %
                       (i + 1, heads, lasts))
    return bad


def main(argv):
    if argv[1] == "inject":
        bad = inject(argv[2], argv[3])
    elif argv[1] == "html":
        bad = html(argv[2], argv[3:])
    elif argv[1] == "pdf":
        sep = argv.index("--")
        bad = pdf(argv[2], argv[3], argv[4:sep], argv[sep + 1:])
    else:
        raise SystemExit(__doc__)
    for b in bad:
        print("layout:", b)
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
