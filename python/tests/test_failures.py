"""Bad inputs raise embz's exceptions, with the location; nothing is printed by the library."""

import pytest

import embz


def test_bad_expression_column_and_caret(capfd):
    with pytest.raises(embz.InputError) as e:
        embz.Family("1/(i+")
    err = e.value
    assert err.column == 5 and err.source == "1/(i+"
    assert err.caret.splitlines()[1] == " " * 4 + "^"
    assert "column 5" in str(err)
    assert isinstance(err, ValueError) and err.status == "input"
    out = capfd.readouterr()
    assert out.out == "" and out.err == ""


def test_bad_family_file_line(tmp_path, capfd):
    p = tmp_path / "bad.fam"
    p.write_text("name = bad\nweight = i^a\nparam a = x\n")
    with pytest.raises(embz.InputError) as e:
        embz.Family(p)
    assert e.value.line == 3 and e.value.file.endswith("bad.fam")
    assert "bad.fam:3" in str(e.value)
    assert capfd.readouterr().err == ""


@pytest.mark.parametrize("call", [
    lambda: embz.error("1/i", n="ten"),
    lambda: embz.error("1/i", n=0),
    lambda: embz.error("1/i", n=-5),
    lambda: embz.error("1/i", n=10, target="ebits:99"),
    lambda: embz.error("1/i", n=10, target=[1.0]),
    lambda: embz.error("1/i", n=10, target=[0.5, -0.5]),
    lambda: embz.error("1/i", n=10, method="fast"),
    lambda: embz.error("1/i", n=10, measure="trace"),
    lambda: embz.error("1/i", n=10, prec=3),
    lambda: embz.error("i^a", n=10, b=1),
    lambda: embz.error("i^a", n=10),
    lambda: embz.error("power", n=10, a="x"),
    lambda: embz.error("nosuchfunction(i)", n=10),
    lambda: embz.convert("0.5,abc", "1"),
    lambda: embz.size("1/i", 2),
    lambda: embz.scan("power", {"nope": (0, 1, 3)}),
    lambda: embz.sweep("1/i", 100, 10),
    lambda: embz.error("1/i"),
])
def test_input_errors(call, capfd):
    with pytest.raises(embz.InputError):
        call()
    assert capfd.readouterr().err == ""


def test_domain_error():
    with pytest.raises(embz.DomainError) as e:
        embz.error("1 - i/3", n=100)
    assert "negative" in str(e.value) or "i =" in str(e.value)
    with pytest.raises(embz.DomainError):
        embz.Family("log(i-1)").weights(1)
    with pytest.raises(embz.DomainError):
        embz.errors("5 - i", [3, 10, 20])


def test_types():
    with pytest.raises(TypeError):
        embz.error("1/i", n=True)
    with pytest.raises(TypeError):
        embz.Family(42)


def test_compute_error_is_runtime():
    assert issubclass(embz.ComputeError, RuntimeError)
    assert issubclass(embz.Cancelled, embz.ComputeError)
    # a size too large for explicit summation, forced explicit
    with pytest.raises(embz.ComputeError):
        embz.error("1/i", n=10 ** 12, method="explicit")
