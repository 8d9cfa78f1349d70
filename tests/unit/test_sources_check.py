"""The check with every source applied says which modes it judged: those whirling at least
half forward (forward share 0.5 or more), mixed and straight-line ones among them, not only
the ones labelled forward."""

import numpy as np

from rotorcalc.analysis.sources_check import SourcesCheck
from rotorcalc.vocabulary import Whirl


def _check(whirl, log_dec):
    return SourcesCheck(1000.0, 0.1, tuple(range(2, 2 + len(whirl))),
                        np.linspace(300.0, 900.0, len(whirl)), np.array(log_dec), tuple(whirl),
                        label="common practice")


def test_the_sentence_names_the_whirl_of_every_mode_judged():
    text = _check((Whirl.FORWARD, Whirl.MIXED), (0.4, 0.05)).summary()
    assert "0.050" in text and "forward, mixed" in text and "2 modes" in text
    assert "forward-mode" not in text
    assert "needed 0.1 (common practice)" in text


def test_one_forward_mode_reads_so():
    text = _check((Whirl.FORWARD,), (0.4,)).summary()
    assert "the 1 mode" in text and "(forward)" in text
