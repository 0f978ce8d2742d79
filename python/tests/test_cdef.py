"""python/embz/_cdef.py is the block of include/embz/flat.h between its markers."""

import os
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
HEADER = os.path.join(HERE, "..", "..", "include", "embz", "flat.h")
CDEF = os.path.join(HERE, "..", "embz", "_cdef.py")


def header_block():
    s = open(HEADER).read()
    return s.split("/* flat-cdef-begin */")[1].split("/* flat-cdef-end */")[0]


def test_cdef_matches_header():
    from embz._cdef import CDEF as cdef
    assert cdef == header_block(), "run: python3 python/tests/test_cdef.py --write"


def test_no_preprocessor_lines():
    assert all(not line.lstrip().startswith("#") for line in header_block().splitlines())


if __name__ == "__main__" and "--write" in sys.argv:
    t = open(CDEF).read()
    head = t.split('CDEF = r"""')[0]
    open(CDEF, "w").write(head + 'CDEF = r"""' + header_block() + '"""\n')
