"""Tests of the DVI/TMDS link emitters."""
