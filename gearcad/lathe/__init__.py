"""Lathe change gears: machine files, thread pitches, swing-frame fit, thread tables."""
