"""Several threads compute at once (the GIL is released during calls) with identical
results; a cancel flag stops a long sweep, Ctrl-C (SIGINT) raises KeyboardInterrupt before it
ends, and the library works afterwards."""

import os
import signal
import subprocess
import sys
import textwrap
import threading
import time

import embz


def test_two_threads_identical():
    fam = embz.Family("logpower")
    sizes = [10 ** 30, 10 ** 100, "10^300", 12345]
    out = [None, None]

    def work(k):
        out[k] = [(r.lo, r.hi, r.how) for r in embz.errors(fam, sizes, target="0.6,0.4")]

    ths = [threading.Thread(target=work, args=(k,)) for k in range(2)]
    for t in ths:
        t.start()
    for t in ths:
        t.join()
    ref = [(r.lo, r.hi, r.how) for r in embz.errors(fam, sizes, target="0.6,0.4")]
    assert out[0] == out[1] == ref


def test_calls_release_the_gil():
    # while one thread is inside a long library call, Python code in another thread runs
    # (a call holding the GIL would leave the counter near 0)
    done = threading.Event()
    ticks = [0]

    def long_call():
        embz.sweep("inverse", 10, "10^300", 16, target="0.7,0.3")
        done.set()
    t = threading.Thread(target=long_call)
    t.start()
    while not done.is_set():
        ticks[0] += 1
        time.sleep(0.001)
    t.join()
    assert ticks[0] > 50


LONG = dict(start=10, stop="10^1000", points=60, target="0.7,0.3")


def test_cancel_flag_stops_a_sweep():
    c = embz.Cancel()
    threading.Timer(1.0, c.set).start()
    try:
        embz.sweep("inverse", cancel=c, **LONG)
        raise AssertionError("not cancelled")
    except embz.Cancelled:
        pass
    # the library stays usable
    assert embz.error("1/i", n=10 ** 30).certified.startswith("0.009951180600227045115")


def test_cancel_from_a_worker_thread():
    c = embz.Cancel()
    box = {}

    def work():
        try:
            embz.sweep("inverse", cancel=c, **LONG)
            box["r"] = "finished"
        except embz.Cancelled:
            box["r"] = "cancelled"
    t = threading.Thread(target=work)
    t.start()
    time.sleep(1.0)
    c.set()
    t.join(10)
    assert box.get("r") == "cancelled"


def test_ctrl_c_interrupts_a_sweep():
    code = textwrap.dedent("""
        import sys, time, embz
        print("ready", flush=True)
        t0 = time.monotonic()
        try:
            embz.sweep("inverse", 10, "10^1000", 60, target="0.7,0.3")
            print("finished")
        except KeyboardInterrupt:
            print("interrupted %.1f" % (time.monotonic() - t0))
        print(embz.error("1/i", n=10**30).certified)
    """)
    p = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE,
                         stderr=subprocess.PIPE, text=True, env=os.environ)
    assert p.stdout.readline().strip() == "ready"
    time.sleep(1.5)
    p.send_signal(signal.SIGINT)
    out, err = p.communicate(timeout=60)
    lines = out.split()
    assert lines[0] == "interrupted", (out, err)       # the sweep itself takes several seconds
    assert lines[2].startswith("0.009951180600227045115"), out
    assert p.returncode == 0 and err == ""
