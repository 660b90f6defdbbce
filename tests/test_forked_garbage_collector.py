"""map_forked sets the garbage collector's frozen generation aside for the length of its work
and then unfreezes it all, including what the program calling it had frozen itself (a host that freezes its
start-up objects before forking workers of its own, as gc.freeze's documentation suggests). A library call
must leave the interpreter's collector as it found it.
"""

import gc

from steamcalc.review.forked import map_forked


def test_map_forked_leaves_the_callers_frozen_objects_frozen():
    gc.freeze()
    try:
        frozen = gc.get_freeze_count()
        assert frozen > 0
        assert map_forked(lambda i: i * i, 30, 2) == [i * i for i in range(30)]
        assert gc.get_freeze_count() >= frozen
    finally:
        gc.unfreeze()


def test_map_forked_leaves_nothing_frozen_when_nothing_was():
    gc.unfreeze()
    assert map_forked(lambda i: i, 30, 2) == list(range(30))
    assert gc.get_freeze_count() == 0
