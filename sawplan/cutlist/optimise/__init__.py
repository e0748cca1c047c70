"""The cutting-stock optimiser: column generation, rounding and repair, exact steps, bounds."""
