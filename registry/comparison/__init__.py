"""Computed barriers against measured ones: pairs at a common temperature, and statistics per
level of theory (:mod:`.pairs`, :mod:`.stats`)."""
