"""Cut lists: which pieces to cut from which bars (optimiser in ``optimise``)."""
