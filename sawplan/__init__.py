"""sawplan: plan band-saw work on metal stock — blade, speed, feed, time, weight, cut lists, blade life."""

__version__ = "0.1.0"
