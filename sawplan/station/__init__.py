"""The shop-floor station: ``sawplan serve``, a web page at each saw that fills the blade log.

``app`` builds the application, ``access`` guards it (keys, roles, form
tokens, headers), ``web`` holds what every page shares, ``floor`` the station
pages and their taps, ``office`` (its own package) the office pages.  Every
value typed goes through ``sawplan.fields`` and every write through the
store's own calls, as on the command line.
"""
