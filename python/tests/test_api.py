"""The API against the CLI's JSON for the same input (python/embz against build/src/cli/embz)."""

from fractions import Fraction

import pytest

import embz

CASES = [
    (("1/i",), {}, "10^30", None, []),
    (("i^a",), {"a": -0.7}, "1e6", "ebits:2", ["--set", "a=-0.7"]),
    (("inverse",), {}, "10^1000", [0.7, 0.3], []),
    (("power",), {"a": Fraction(-3, 2)}, "1000", "uniform:3", ["--set", "a=-3/2"]),
    (("1/(i*log(i+1)^b)",), {"b": "1/2"}, "10^100", None, ["--set", "b=1/2"]),
]


@pytest.mark.parametrize("spec,params,n,target,sets", CASES)
def test_error_matches_cli(cli, spec, params, n, target, sets):
    r = embz.error(spec[0], n=n, target=target, **params)
    args = ["error", spec[0], "-n", n] + sets
    if target is not None:
        args += ["--target", target if isinstance(target, str) else
                 ",".join(str(x) for x in target)]
    j = cli(*args)
    assert r.lo == j["error_lo"] and r.hi == j["error_hi"]
    assert r.certified == j["error_certified"]
    assert str(r.argmax) == j["argmax"]
    assert r.method == j["method"]
    assert r.how == j["detail"]
    assert r.n == int(j["n"])
    assert r.target == j["target"]
    assert (r.estimate != r.estimate and j["estimate"] is None) or r.estimate == j["estimate"]
    if "bound_lo" in j:
        assert (r.bound_lo, r.bound_hi) == (j["bound_lo"], j["bound_hi"])


def test_python_ints_and_texts_agree():
    a = embz.error("1/i", n=10 ** 30)
    b = embz.error("1/i", n="10^30")
    assert (a.lo, a.hi) == (b.lo, b.hi)
    big = embz.error("1/i", n=10 ** 5000)        # beyond Python's decimal conversion limit
    assert big.n == 10 ** 5000 and big.ok
    assert Fraction(big.lo) > 0


def test_prec_and_method(cli):
    r = embz.error("inverse", n=2000, prec=256, method="analytic")
    j = cli("error", "inverse", "-n", 2000, "--prec", 256, "--method", "analytic")
    assert (r.lo, r.hi, r.certified, r.method) == (j["error_lo"], j["error_hi"],
                                                   j["error_certified"], "analytic")
    e = embz.error("inverse", n=2000, method="explicit")
    assert e.method == "explicit"


@pytest.mark.parametrize("measure,n", [("fidelity", 1000), ("purified", 500), ("overlap", 64),
                                       ("overlap", 10 ** 30),
                                       ("fidelity", 10 ** 7)])
def test_measures_match_cli(cli, measure, n):
    r = embz.error("inverse", n=n, measure=measure)
    j = cli("error", "inverse", "-n", n, "--measure", measure)
    assert (r.lo, r.hi) == (j["value_lo"], j["value_hi"])
    assert r.bounds_only == j["bounds_only"]
    assert r.measure == j["measure"]


def test_errors_many_sizes(cli):
    sizes = [10, 4096, 10 ** 6, "10^30", 10 ** 300]
    s = embz.errors("logpower", sizes, target="ebits:2")
    assert len(s) == 5 and all(r.ok for r in s)
    assert s.n == [10, 4096, 10 ** 6, 10 ** 30, 10 ** 300]
    for r in s:
        j = cli("error", "logpower", "-n", r.n, "--target", "ebits:2")
        # one workspace over the sizes: another engine than the one-call form, so the
        # enclosures need only overlap
        assert Fraction(r.lo) <= Fraction(j["error_hi"]) and Fraction(j["error_lo"]) <= Fraction(r.hi)
    np = pytest.importorskip("numpy")
    assert isinstance(s.lo, np.ndarray) and s.lo.dtype == float
    assert (s.lo <= s.mid).all() and (s.mid <= s.hi).all()
    for lo, r in zip(s.lo, s):           # outward rounding: the double stays a lower bound
        assert Fraction(float(lo)) <= Fraction(r.lo)


def test_mpmath_interval():
    mpmath = pytest.importorskip("mpmath")
    r = embz.error("1/i", n=10 ** 30)
    iv = r.interval
    assert isinstance(iv, mpmath.ctx_iv.ivmpf)
    assert iv.a <= mpmath.mpf(r.lo) and mpmath.mpf(r.hi) <= iv.b


def test_family_object():
    f = embz.Family("power", a=-0.7)
    assert f.params == {"a": Fraction(-7, 10)}
    assert f.name == "power" and "a=-7/10" in f.label
    g = embz.Family("i^a", params={"a": "-7/10"})
    assert g.weight == embz.Family("i^(-7/10)").weight
    amp = embz.Family("1/i", amplitude=True)
    w = amp.weights([1, 2, 3])
    assert [x.exact for x in w] == [1, Fraction(1, 4), Fraction(1, 9)]
    assert f.weights(1).contains(1)
    b = f.weights(2)
    assert b.exact is None and b.contains("0.61557220667245814224969653458387155494")
    assert f.error(10 ** 6).ok and len(f.errors([10, 100])) == 2
    assert "<table>" in f._repr_html_()
    nf = embz.Family("1/(i+n)")
    assert nf.depends_on_n
    assert nf.weights(3, n=10).exact == Fraction(1, 13)


def test_family_file(tmp_path):
    p = tmp_path / "my.fam"
    p.write_text("name = mine\ndescription = a test family\nweight = i^a\nparam a = -1\n")
    f = embz.Family(p)
    assert f.name == "mine" and f.params == {"a": -1}
    assert embz.error(f, n=1000).lo == embz.error("1/i", n=1000).lo
    g = embz.Family(str(p), a="-1/2")
    assert g.params == {"a": Fraction(-1, 2)}


def test_families(cli):
    names = [f["name"] for f in embz.families()]
    assert "inverse" in names and "power" in names
    out = cli("families", json_out=False)
    for n in names:
        assert n in out


def test_targets():
    assert embz.Target().label == "ebit"
    assert embz.Target("ebits:3").label == "ebits:3"
    assert embz.Target([0.5, 0.5]).label == "ebit"          # a uniform vector is stored as such
    assert embz.Target([0.25] * 4).label == "uniform:4"
    v = embz.Target([Fraction(2, 3), Fraction(1, 3)])
    a = embz.error("1/i", n=500, target=v)
    b = embz.error("1/i", n=500, target="2/3,1/3")
    assert (a.lo, a.hi) == (b.lo, b.hi)


def test_convert_matches_cli(cli):
    c = embz.convert([0.4, 0.4, 0.1, 0.1], [0.5, 0.25, 0.25])
    j = cli("convert", "0.4,0.4,0.1,0.1", "0.5,0.25,0.25")
    assert c.convertible == j["convertible"]
    assert c.reverse_convertible == j["reverse_convertible"]
    assert str(c.K_forward) == j["K_forward"]["exact"] and c.argk_forward == j["K_forward"]["argk"]
    assert str(c.K_backward) == j["K_backward"]["exact"]
    assert (c.F_forward.lo, c.F_forward.hi) == (j["F_max_forward"]["lo"], j["F_max_forward"]["hi"])
    assert (c.P_backward.lo, c.P_backward.hi) == (j["P_backward"]["lo"], j["P_backward"]["hi"])
    assert embz.convert("3,1", "1,1").convertible is False
    assert embz.convert("1,1", "3,1").convertible is True


def test_sweep_matches_cli(cli):
    s = embz.sweep("inverse", 10, "10^200", 12)
    j = cli("sweep", "inverse", "--from", 10, "--to", "10^200", "-k", 12)
    pts = j["points"]
    assert [str(n) for n in s.n] == [p["n"] for p in pts]
    for r, p in zip(s.points, pts):
        assert Fraction(r.lo) <= Fraction(p["error_hi"]) and Fraction(p["error_lo"]) <= Fraction(r.hi)
    assert s.best is not None and s.best.law == j["fits"]["best"]
    assert "<table>" in s._repr_html_()


def test_sweep_narrowed_and_threads(cli):
    # a weight the analytic engine declines (not monotone): the sweep keeps to explicit sizes
    s = embz.sweep("1/(i*(2+sin(i)))", 10, "10^100", 6, threads=2)
    j = cli("sweep", "1/(i*(2+sin(i)))", "--from", 10, "--to", "10^100", "-k", 6)
    assert s.narrowed_to == int(j["narrowed_to"]) and s.narrowed_to <= 10 ** 7
    assert "monotone" in s.narrowed_why and s.narrowed_why == j["narrowed_why"]
    assert [str(n) for n in s.n] == [p["n"] for p in j["points"]]
    assert max(s.n) == s.narrowed_to
    assert embz.sweep("inverse", 10, "10^100", 6, threads=2).narrowed_to is None


def test_size_explicit_only(cli):
    r = embz.size("1/(i*(2+sin(i)))", "0.01")
    j = cli("size", "1/(i*(2+sin(i)))", "--eps", "0.01")
    g = j["goals"][0] if "goals" in j else j
    assert r.status == g["status"] == "not_reached"
    assert r.explicit_only and g["explicit_only"] is True and r.reach == int(g["reach"])
    assert r.largest == r.reach and "monotone" in r.why
    # a level family: qubits from its dimension (2^n for n qubit copies), as the CLI
    lv = embz.size("qubitcopies", "0.2")
    assert lv.qubits == cli("size", "qubitcopies", "--eps", "0.2")["goals"][0]["qubits"]
    assert lv.qubits == lv.n


def test_classify_matches_cli(cli):
    v = embz.classify("nearmiss")
    j = cli("classify", "nearmiss")
    assert v.verdict == j["verdict"] and v.law == j["law"]
    assert v.reasons == j["reasons"]
    assert len(v.points) == len(j["points"])


def test_scan_matches_cli(cli):
    sc = embz.scan("power", {"a": (-1.5, -0.5, 3)})
    out = cli("scan", "power", "--grid", "a=-1.5:-0.5:3")
    rows = out if isinstance(out, list) else [out]
    assert [r["verdict"] for r in sc] == [r["verdict"] for r in rows]
    assert [r["a"] for r in sc] == [Fraction(-3, 2), Fraction(-1), Fraction(-1, 2)]
    np = pytest.importorskip("numpy")
    arr = sc.to_numpy()
    assert arr["a"].tolist() == [-1.5, -1.0, -0.5]


def test_size_matches_cli(cli):
    r = embz.size("inverse", 0.1)
    j = cli("size", "inverse", "--eps", "0.1")
    goal = j["goals"][0] if "goals" in j else j
    assert str(r.n) == goal["n"] and r.status == "found"
    q = embz.size("inverse", "0.01", qubits=True)
    jq = cli("size", "inverse", "--eps", "0.01", "--qubits")
    gq = jq["goals"][0] if "goals" in jq else jq
    assert r.qubits >= 1 and q.qubits == gq["qubits"]
    never = embz.size("nearmiss", "1e-6")
    assert never.status == "not_reached"


def test_compare_and_render(tmp_path):
    cmp = embz.compare(["inverse", "logpower"], sizes=[10 ** 6, "10^30"], eps=[0.05],
                       classify_families=False)
    recs = cmp.to_records()
    assert [r["family"] for r in recs] == ["inverse", "logpower (b=1/2)"]
    assert recs[0]["E(1000000)"] == embz.error("inverse", n=10 ** 6).certified
    assert "<table>" in cmp._repr_html_()
    s = embz.errors("inverse", [10, 1000, 10 ** 6, 10 ** 30])
    svg = embz.plot_svg(s, title="inverse")
    assert svg.lstrip().startswith("<svg") and "</svg>" in svg
    path = embz.plot_svg([s, embz.errors("logpower", [10, 1000])], tmp_path / "e.pdf")
    assert (tmp_path / "e.pdf").read_bytes()[:4] == b"%PDF"
    doc = embz.report_html(cmp, [svg])
    assert "<html" in doc and "<figure" in doc and "inverse" in doc
    assert recs[0]["E(1000000)"] in doc
    tex = embz.report(cmp, format="tex")
    assert "\\begin{tabular}" in tex or "tabular" in tex
    md = embz.report(cmp, format="md")
    assert "| inverse" in md or "inverse" in md
    embz.report(cmp, tmp_path / "cmp.pdf", figures=[svg])
    assert (tmp_path / "cmp.pdf").read_bytes()[:4] == b"%PDF"
    with pytest.raises(embz.InputError):
        embz.report(cmp, format="docx")
    mpl = pytest.importorskip("matplotlib")
    mpl.use("Agg")
    ax = embz.plot_errorbars(s)
    assert ax.get_yscale() == "log"


def test_reprs():
    r = embz.error("1/i", n=10 ** 30)
    assert "0.00995118060022704511501427270235" in str(r)
    assert "10^30" in str(r)
    assert "<table>" in r._repr_html_()
    assert "<table>" in embz.errors("1/i", [10, 100])._repr_html_()
