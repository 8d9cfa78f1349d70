"""The check with every source applied says which modes it judged: those whirling at least
half forward (forward share 0.5 or more), mixed and straight-line ones among them, not only
the ones labelled forward."""

import dataclasses

import numpy as np
import pytest

from rotorcalc.analysis.sources_check import SourcesCheck, sources_check
from rotorcalc.errors import InputError
from rotorcalc.reader import read_rotor
from rotorcalc.vocabulary import Whirl
from tests.conftest import ROOT


def _check(whirl, log_dec):
    return SourcesCheck(1000.0, 0.1, tuple(range(2, 2 + len(whirl))),
                        np.linspace(300.0, 900.0, len(whirl)), np.array(log_dec), tuple(whirl),
                        label="common practice")


def test_the_sentence_names_the_whirl_of_every_mode_judged():
    text = _check((Whirl.FORWARD, Whirl.MIXED), (0.4, 0.05)).summary()
    assert "0.050" in text and "(forward, mixed)" in text and "the 2 modes" in text
    assert "forward share of one half or more" in text
    assert "forward-mode" not in text
    assert "needed 0.1 (common practice)" in text


def test_one_forward_mode_reads_so():
    text = _check((Whirl.FORWARD,), (0.4,)).summary()
    assert "the only mode" in text and "(forward)" in text


def test_a_check_that_finds_no_forward_mode_stops_rather_than_passes():
    """The compressor asked for one mode: at its maximum continuous speed the lowest mode
    whirls backward, so the check with its stages applied judges nothing; it used to pass
    (an empty set of modes meets every limit).  Now it asks for more modes."""
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    one = dataclasses.replace(rotor, settings=dataclasses.replace(rotor.settings, mode_count=1))
    with pytest.raises(InputError, match="mode_count"):
        sources_check(one)
    two = dataclasses.replace(rotor, settings=dataclasses.replace(rotor.settings, mode_count=2))
    assert sources_check(two).numbers == (2,)
