"""The shop-floor station: a small web application over the blade log."""
