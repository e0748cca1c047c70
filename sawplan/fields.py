"""The fields a user types, in one table: spelling, words, unit and plausible range.

Every value a shop enters — on the command line, in a job file, in an
imported CSV, at the saw-side station — is one of these fields.  The table
says how the command line spells it (one option name, one short flag, one
placeholder everywhere), what a shop calls it ("band speed", "blade price"),
its dimension and its plausible physical range with the reason for it, and
under which names it appears in job files, CSV files and the blade log
(``names``: ``"TABLE.column"``).

``check`` applies a field's range to a number in the core unit; ``parse``
reads user text in any unit and checks it.  Both fail with one line naming the
field in the user's words, the range and the unit.  Pure: no I/O, no typer.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from types import MappingProxyType

from sawplan.errors import BadDataError

# placeholders of things that are not numbers
FILE = "FILE"
DIR = "DIR"


@dataclass(frozen=True)
class Field:
    """One field: how it is spelled, what it is called, and what values it may take.

    ``low``/``high`` are in the core unit of ``dimension`` (DEVELOPERS.md), in
    plain numbers for dimensionless fields, or in characters for text.
    ``above`` makes ``low`` exclusive ("above 0").
    """

    key: str
    words: str
    option: str | None = None
    short: str | None = None
    placeholder: str = ""
    help: str = ""
    dimension: str | None = None
    low: float | None = None
    high: float | None = None
    above: bool = False
    integer: bool = False
    why: str = ""
    choices: tuple[str, ...] = ()
    negative: str | None = None  # the off spelling of an on/off switch, e.g. --no-coolant
    names: tuple[str, ...] = ()  # "TABLE.column" in job files, CSV files and the blade log

    @property
    def is_switch(self) -> bool:
        return self.option is not None and not self.placeholder

    @property
    def is_text(self) -> bool:
        return self.dimension == "text"

    def range_text(self) -> str:
        """``from 3 to 2,000 m/min``, ``above 0 and at most 1``, ``at most 300 characters``."""
        lo = None if self.low is None else self.show(self.low)
        hi = None if self.high is None else self.show(self.high)
        if lo is not None and hi is not None:
            return f"above {lo} and at most {hi}" if self.above else f"from {lo} to {hi}"
        if lo is not None:
            return f"above {lo}" if self.above else f"at least {lo}"
        if hi is not None:
            return f"at most {hi}"
        return "any value"

    def show(self, value: float) -> str:
        """A value of this field with its unit, in the unit that reads best."""
        if self.is_text:
            return f"{value:,.0f} characters"
        label, factor = _shown_unit(self.dimension, value)
        return f"{_number(value / factor)}{' ' + label if label else ''}"


# --- the table ------------------------------------------------------------------------------

_CHART = "the terminal chart"
_SHORT_TEXT = "a name or number of a few characters"
_LINE = "a few words on one line"
_NIOSH = "the revised NIOSH lifting equation's own limits (NIOSH Pub. 94-110)"

# fmt: off
_TABLE: tuple[Field, ...] = (
    # -- output and files, the same for every command
    Field("units", "units", "--units", "-u", "us|metric",
          "Units to show: us (in, lb, ft/min) or metric (mm, kg, m/min).",
          choices=("us", "metric")),
    Field("fractions", "inch fractions", "--fractions",
          help="With --units us, lengths in inches to the nearest 1/32 (7-1/4) instead of "
               "decimals."),
    Field("json", "JSON output", "--json", help="Print JSON (keys carry their unit)."),
    Field("csv", "CSV output", "--csv", help="Print CSV instead of a table."),
    Field("db", "blade log", "--db", placeholder="PATH|URL",
          help="The blade log: a file or a postgresql:// URL (default: per-user data folder; "
               "env SAWPLAN_DB, config db)."),
    Field("copy_from", "log to copy", "--from", placeholder="PATH|URL",
          help="The log to copy: a file or a postgresql:// URL."),
    Field("copy_to", "log to copy into", "--to", placeholder="PATH|URL",
          help="A new file or an empty database to copy into."),
    Field("materials_file", "materials file", "--materials-file", placeholder=FILE,
          help="Your own materials CSV, added to the catalogue (env SAWPLAN_MATERIALS)."),
    Field("saws_file", "saws file", "--saws", placeholder=FILE,
          help="Your own saws TOML file, added to the packaged ones (env SAWPLAN_SAWS)."),
    Field("force", "replace files", "--force", help="Replace files that exist."),
    Field("file", "file", placeholder=FILE, help="A file."),
    Field("folder", "folder", placeholder=DIR, help="A folder."),
    Field("setting", "setting", placeholder="KEY",
          help="units, saw, db, currency, log_mode, materials_file or saws_file."),
    Field("setting_value", "setting value", placeholder="VALUE", help="The value to keep."),
    Field("csv_dir", "CSV folder", "--csv-dir", placeholder=DIR,
          help="Write the CSV files into this folder."),
    Field("sheet", "cut sheet", "--sheet", placeholder=FILE,
          help="Write a cut sheet: FILE.html to print, or FILE.md (Markdown)."),
    Field("job_file", "job file", "--job-file", placeholder="JOBFILE",
          help="A job file (TOML), see `sawplan plan --help`."),
    Field("allow", "files outside the job's folder", "--allow",
          help="Let the job file name files outside its own folder (stock_file)."),
    Field("chart", "chart", "--chart", help="Draw the chart too."),
    Field("chart_width", "chart width", "--chart-width", placeholder="COLS",
          help="Chart width in characters.", low=20, high=500, integer=True,
          why=f"narrower than 20 columns {_CHART} cannot show its axes; 500 is wider than any "
               f"screen"),
    Field("chart_height", "chart height", "--chart-height", placeholder="LINES",
          help="Chart height in lines.", low=5, high=200, integer=True,
          why=f"{_CHART} needs 5 lines for its axes; 200 is taller than any screen"),
    Field("currency", "currency", "--currency", placeholder="TEXT", dimension="text", high=12,
          help="Currency of prices and quotes, e.g. EUR, USD.",
          why="a currency code or sign is a few characters", names=("job.currency",)),
    # -- the work
    Field("material", "material", "--material", "-m", "MATERIAL",
          "The work's material key (see `sawplan materials`), e.g. 4140.", dimension="text",
          high=60, why="catalogue keys are short",
          names=("stock.material", "part.material", "cuts.material")),
    Field("section", "section", placeholder="SECTION...",
          help="Shape and sizes with units, e.g. tube 2in 0.12in.", dimension="text", high=200,
          why="a shape word and a few sizes",
          names=("stock.section", "part.section", "cuts.section")),
    Field("size", "section size", dimension="length", low=0.1, high=5000, above=False,
          why="thinner than 0.1 mm is foil, not bar; the largest band saws take about 2 m, so "
              "over 5 m is a typing slip"),
    Field("orient", "orientation", "--orient", "-o", "WORD",
          "How the work lies in the vise, e.g. flat, edge, corner."),
    Field("bundle", "bundle", "--bundle", "-b", "ROWSxCOLS",
          "Cut a bundle ROWSxCOLS at once, e.g. 3x2."),
    Field("dry", "dry cut", "--dry", help="Cut without coolant."),
    Field("nest", "nested bundle", "--nest", help="Rounds in a bundle nest into the row below."),
    Field("length", "piece length", "--length", "-l", "LENGTH",
          "Length of one piece, e.g. 1m, 12ft, 300mm.", dimension="length", low=0.1, high=100_000,
          why="a slice under 0.1 mm is not a sawn piece; no stock bar is 100 m long (bars come in "
              "3-12 m)",
          names=("stock.length", "part.length")),
    Field("count", "number of pieces", "--count", "-n", "N", "Number of pieces.", low=1,
          high=1_000_000, integer=True, why="a lot of more than a million pieces is a typing slip",
          names=("part.count",)),
    Field("stock_count", "bars on hand", low=0, high=1_000_000, integer=True,
          why="0 lists a length to buy; a rack of more than a million bars is a typing slip",
          names=("stock.count",)),
    Field("reach", "reach", "--reach", placeholder="LENGTH",
          help="Hands' distance in front of the ankles at the lift (default 25cm).",
          dimension="length", low=0, high=630, why=f"over 63 cm gives no safe load; {_NIOSH}"),
    Field("lift_from", "lift height", "--lift-from", placeholder="LENGTH",
          help="Height of the hands at the start of the lift (default 75cm).", dimension="length",
          low=0, high=1750, why=f"over 175 cm gives no safe load; {_NIOSH}"),
    Field("travel", "lift travel", "--travel", placeholder="LENGTH",
          help="Vertical travel of the lift (default 25cm).", dimension="length", low=0, high=1750,
          why=f"over 175 cm gives no safe load; {_NIOSH}"),
    Field("twist", "twist", "--twist", placeholder="DEGREES",
          help="How far the body turns away from straight ahead during the lift, in degrees "
               "(default 0): swinging a long bar from the rack to the saw.",
          low=0, high=135, why=f"over 135° gives no safe load; {_NIOSH}"),
    Field("lifts_per_min", "lifts per minute", "--lifts-per-min", placeholder="RATE",
          help="How often the lift is repeated, per minute.", low=0, high=15,
          why=f"over 15 lifts a minute gives no safe load; {_NIOSH}"),
    # -- saws
    Field("saw", "saw", "--saw", "-s", "NAME", "The saw (see `sawplan saw list`).",
          dimension="text", high=60, why="a saw's name in the shop",
          names=("job.saw", "saws.name", "fittings.saw", "cuts.saw")),
    Field("like", "saw to start from", "--like", placeholder="NAME",
          help="Start from this saw's profile."),
    Field("saw_kind", "saw kind", "--kind", placeholder="WORD",
          help="horizontal, column or vertical.", choices=("horizontal", "column", "vertical"),
          names=("saws.kind",)),
    Field("wheel", "wheel diameter", "--wheel", placeholder="LENGTH",
          help="Wheel diameter, e.g. 450mm.", dimension="length", low=80, high=3000,
          why="portable saws have wheels of about 100 mm, the largest saws under 2 m",
          names=("saws.wheel_diameter_mm",)),
    Field("wheels", "number of wheels", "--wheels", placeholder="N",
          help="Number of wheels (2-4).", low=2, high=4, integer=True,
          why="band saws run on two, three or four wheels", names=("saws.wheel_count",)),
    Field("blade_length", "blade length", "--blade-length", placeholder="LENGTH",
          help="Blade length, e.g. 3505mm.", dimension="length", low=500, high=30_000,
          why="portable saws take bands of about 1.1 m, the largest metal saws under 20 m",
          names=("saws.blade_length_mm", "blades.length_mm")),
    Field("blade_width", "blade width", "--blade-width", placeholder="LENGTH",
          help="Blade width, e.g. 27mm, 1in.", dimension="length", low=3, high=100,
          why="metal-cutting bands run from 1/8 in (3 mm) to about 3 in (80 mm) wide",
          names=("saws.blade_width_mm", "blades.width_mm")),
    Field("blade_thickness", "blade thickness", "--blade-thickness", placeholder="LENGTH",
          help="Blade thickness, e.g. 0.9mm.", dimension="length", low=0.3, high=3,
          why="metal-cutting bands run from 0.025 in (0.6 mm) to 0.063 in (1.6 mm) thick",
          names=("saws.blade_thickness_mm", "blades.thickness_mm")),
    Field("band_speed", "band speed", "--band-speed", placeholder="SPEED",
          help="Band speed, e.g. 60m/min, 200ft/min.", dimension="speed", low=3, high=2000,
          why="the slowest metal-cutting saws run about 10 m/min, high-speed aluminium saws about "
              "1,500 m/min (common practice)",
          names=("saws.band_speed_min_m_min", "saws.band_speed_max_m_min",
                 "cuts.band_speed_m_min", "materials.band_speed_m_min")),
    Field("speed_range", "band speed range", "--speed-range", placeholder="LOW-HIGH",
          help="Band speed range, e.g. 20-90m/min."),
    Field("power", "motor power", "--power", placeholder="POWER",
          help="Motor power, e.g. 1.5kW or 2hp.", dimension="power", low=50, high=100_000,
          why="bench saws have motors of a few hundred watts, production saws up to about 30 kW",
          names=("saws.motor_power_w",)),
    Field("efficiency", "drive efficiency", "--efficiency", placeholder="FRACTION",
          help="Motor-to-blade efficiency, from 0.1 to 1.", low=0.1, high=1,
          why="a drive cannot give the blade more than the motor's power, and none loses "
              "nine tenths of it",
          names=("saws.drive_efficiency",)),
    Field("capacity_round", "round capacity", "--capacity-round", placeholder="LENGTH",
          help="Largest round, e.g. 260mm.", dimension="length", low=10, high=5000,
          why="the smallest saws take about 100 mm, the largest about 2 m",
          names=("saws.capacity_round_mm",)),
    Field("capacity_rect", "rectangle capacity", "--capacity-rect", placeholder="WxH",
          help="Largest rectangle WIDTHxHEIGHT, e.g. 350x260mm.", dimension="length", low=10,
          high=5000, why="the smallest saws take about 100 mm, the largest about 2 m",
          names=("saws.capacity_rect_w_mm", "saws.capacity_rect_h_mm")),
    Field("feed_type", "feed type", "--feed-type", placeholder="WORD",
          help="constant, gravity or hydraulic.", choices=("constant", "gravity", "hydraulic"),
          names=("saws.feed_type",)),
    Field("head_force", "head force", "--head-force", placeholder="FORCE",
          help="Head force of a gravity or hydraulic feed, e.g. 2500N.", dimension="force", low=10,
          high=200_000,
          why="a light head weighs a few kg; the largest hydraulic feeds push some tens of kN",
          names=("saws.head_force_n",)),
    Field("coolant", "coolant", "--coolant", negative="--no-coolant",
          help="Whether the saw has flood coolant.", names=("saws.coolant",)),
    Field("replace", "replace the saw", "--replace", help="Update a saw already in the log."),
    # -- blades
    Field("tag", "blade tag", placeholder="TAG", help="The blade's tag, e.g. B-017.",
          dimension="text", high=40, why="a tag painted on the blade's box",
          names=("blades.tag", "fittings.blade", "cuts.blade", "events.blade")),
    Field("blade", "blade", "--blade", placeholder="TAG",
          help="The blade's tag (default: the fitted blade).", dimension="text", high=40,
          why="a tag painted on the blade's box"),
    Field("pitch", "pitch", "--pitch", "-p", "TPI", "Teeth per inch, e.g. 3/4, 6, 10/14.", low=0.5,
          high=32,
          why="the coarsest metal-cutting bands have about 0.75 teeth per inch, the finest 24-32",
          names=("blades.tpi_coarse", "blades.tpi_fine")),
    Field("blade_material", "blade material", "--blade-material", placeholder="WORD",
          help="bi-metal, carbon or carbide.", choices=("bi-metal", "carbon", "carbide"),
          names=("blades.blade_material",)),
    Field("grade", "tooth grade", "--grade", placeholder="WORD",
          help="Tooth grade, e.g. M42, M51.", dimension="text", high=40, why=_SHORT_TEXT,
          names=("blades.grade",)),
    Field("tooth_form", "tooth form", "--form", placeholder="WORD",
          help="Tooth form: regular, hook or skip.", choices=("regular", "hook", "skip"),
          names=("blades.tooth_form",)),
    Field("tooth_set", "tooth set", "--set", placeholder="WORD",
          help="Tooth set: raker, wavy or alternate.", choices=("raker", "wavy", "alternate"),
          names=("blades.tooth_set",)),
    Field("supplier", "supplier", "--supplier", placeholder="TEXT",
          help="Who supplied it, free text.", dimension="text", high=120, why=_LINE,
          names=("blades.supplier",)),
    Field("lot", "lot number", "--lot", placeholder="TEXT", help="Supplier's lot number.",
          dimension="text", high=60, why=_SHORT_TEXT, names=("blades.lot",)),
    Field("without_lot", "lot left out", "--without-lot", placeholder="TEXT",
          help="Leave this lot's blades out of the blade life (repeat for more).",
          dimension="text", high=60, why=_SHORT_TEXT),
    Field("blade_price", "blade price", "--price", placeholder="AMOUNT",
          help="Price paid for the blade, in your currency.", low=0, high=1_000_000,
          why="a band costs from a few to a few thousand in any common currency, yen included; "
              "more is a typing slip",
          names=("blades.price", "job.blade_price")),
    Field("bought", "date bought", "--bought", placeholder="DATE",
          help="Date bought: YYYY-MM-DD, today or yesterday.", names=("blades.bought_on",)),
    Field("welded", "welded", "--welded", placeholder="WORD", help="in-house or bought (welded).",
          choices=("in-house", "bought"), names=("blades.welded",)),
    Field("tension", "blade tension", "--tension", placeholder="STRESS",
          help="Tension set, e.g. 200MPa or 30ksi.", dimension="stress", low=20, high=600,
          why="bands are tensioned to about 200-300 MPa (30-45 ksi); over 600 MPa nears the yield "
              "of the band (common practice)",
          names=("fittings.tension_mpa",)),
    Field("break_in", "break-in", "--break-in", negative="--no-break-in",
          help="Whether the blade is being broken in.", names=("fittings.break_in",)),
    Field("break_in_how", "how the blade is broken in", "--break-in-how", placeholder="TEXT",
          help="How, in a few words.", dimension="text", high=120, why=_LINE,
          names=("fittings.break_in_how",)),
    Field("failure", "failure", "--failure", "-f", "WORD",
          "How the blade ended: worn-out (a normal life of wear) or the failure, e.g. "
          "stripped, weld, dull.",
          names=("blades.retire_cause", "events.mode")),
    Field("location", "where on the blade", "--location", placeholder="TEXT",
          help="Where on the blade, e.g. gullet, weld.", dimension="text", high=120, why=_LINE,
          names=("events.location",)),
    Field("teeth", "teeth lost", "--teeth", placeholder="N",
          help="Teeth lost (teeth-lost; default 1).", low=1, high=10_000, integer=True,
          why="more than 10,000 teeth is more than a 30 m band carries at 8 TPI",
          names=("events.teeth",)),
    Field("event_kind", "event", placeholder="KIND", help="teeth-lost, crooked, stall or failure.",
          choices=("teeth-lost", "crooked", "stall", "failure"), names=("events.kind",)),
    Field("status", "blade status", "--status", placeholder="WORD",
          help="Only new, fitted, removed or retired blades.",
          choices=("new", "fitted", "removed", "retired"), names=("blades.status",)),
    # -- the blade log
    Field("date", "date", "--date", "-d", "DATE",
          "When: YYYY-MM-DD, today or yesterday (default today).",
          names=("cuts.cut_on", "events.happened_on", "fittings.fitted_on")),
    Field("note", "note", "--note", placeholder="TEXT", help="Free text.", dimension="text",
          high=300, why="a note is a line or two",
          names=("blades.notes", "saws.notes", "cuts.note", "events.note", "remnants.note",
                 "saw_notes.note")),
    Field("cuts", "number of cuts", "--cuts", placeholder="N",
          help="Identical cuts in this entry.", low=1, high=100_000, integer=True,
          why="more than 100,000 identical cuts in one entry is a typing slip",
          names=("cuts.count",)),
    Field("pieces", "pieces cut at once", low=1, high=10_000, integer=True,
          why="a bundle is a few rows of bars, never ten thousand", names=("cuts.pieces",)),
    Field("area", "area cut", "--area", "-a", "AREA", "Area cut, e.g. 20cm2, 5m2, 800in2.",
          dimension="area", low=1, high=1e9,
          why="under 1 mm² is no cut; 1,000 m² is years of sawing on one saw",
          names=("cuts.area_mm2",)),
    Field("time", "measured time", "--time", placeholder="TIME",
          help="Measured time of the whole entry, e.g. 4.5min.", dimension="time", low=0.01,
          high=100_000,
          why="no band-saw cut takes under a second (0.01 min); a batch of many cuts may run "
              "for weeks of shifts (100,000 min is about 70 days)",
          names=("cuts.time_min",)),
    Field("feed", "feed", "--feed", placeholder="FEED",
          help="Feed: a rate (40mm/min) or the dial setting (3).", dimension="feed", low=0.1,
          high=5000,
          why="at 0.1 mm/min a 1 m bar takes a week to cut through; band saws feed metal at "
              "under 1,000 mm/min, and 5,000 mm/min is a rapid traverse",
          names=("cuts.feed_mm_min",)),
    Field("feed_setting", "feed dial setting", low=0, high=1000, above=True,
          why="a feed dial or valve reads 0-10 or 0-100; 1,000 is no dial (common practice)",
          names=("cuts.feed_setting",)),
    Field("job", "job", "--job", placeholder="REF", help="Job reference.", dimension="text",
          high=60, why="a job number or short name", names=("cuts.job",)),
    Field("heat", "heat number", "--heat", placeholder="TEXT",
          help="Heat or lot number of the stock.", dimension="text", high=60, why=_SHORT_TEXT,
          names=("cuts.heat", "stock.heat", "remnants.heat")),
    Field("limit", "entries to show", "--limit", placeholder="N",
          help="Newest entries to show (0: all).", low=0, high=1_000_000_000, integer=True,
          why="a log never holds a billion entries"),
    Field("group_by", "grouping", "--group-by", placeholder="WORD[,WORD]",
          help="Also fit each group of blades: blade-type, material-group, lot, supplier or saw; "
               "two at once joined by a comma, e.g. blade-type,lot.",
          choices=("blade-type", "material-group", "lot", "supplier", "saw")),
    Field("group", "material group", "--group", "-g", "WORD",
          help="Only this material group, e.g. tool-steel."),
    # -- statistics and planning
    Field("confidence", "confidence", "--confidence", placeholder="FRACTION",
          help="Confidence for intervals and forecasts, from 0.5 to 0.999.", low=0.5, high=0.999,
          why="below 0.5 a forecast is a guess; 0.999 and more needs more blades than any log "
              "holds to mean anything"),
    Field("life", "life per blade", "--life", placeholder="AREA",
          help="Assume this life (area cut) per blade instead, e.g. 2m2.", dimension="area",
          low=10_000, high=1e9,
          why="a blade that cuts under 100 cm² failed, it has no life to plan on; 1,000 m² is far "
              "beyond any band's life"),
    Field("time_limit", "time limit", "--time-limit", placeholder="SECONDS",
          help="Seconds the whole plan may take: a safety stop (the same job gives the same "
               "plan; when the limit stops the optimiser, the plan says so).",
          low=0.5, high=600,
          why="under half a second the safety stop fires before the exact steps; ten minutes "
              "is the longest a shop waits for a plan"),
    Field("order", "order list", "--order",
          help="Print only the bars to order for a short job (with --json as JSON)."),
    Field("kerf", "kerf", dimension="length", low=0.1, high=10,
          why="band kerfs run from about 0.8 mm to 3 mm; over 10 mm is no band saw",
          names=("job.kerf",)),
    Field("trim", "head trim", dimension="length", low=0, high=1000,
          why="a head cut squares a bar end in a few mm; a metre is a typing slip",
          names=("job.trim",)),
    Field("grip", "vise grip", dimension="length", low=0, high=2000,
          why="the tail a vise must hold is at most a few hundred mm", names=("job.grip",)),
    Field("min_remnant", "shortest remnant kept", dimension="length", low=0, high=100_000,
          why="no bar is longer than 100 m", names=("job.min_remnant",)),
    Field("shop_rate", "shop rate", "--shop-rate", placeholder="AMOUNT",
          help="Machine and operator rate per hour, in your currency.", dimension=None, low=0,
          high=100_000, why="per hour in any common currency, yen included",
          names=("job.shop_rate",)),
    Field("handling_time", "handling time per cut", "--handling-time", placeholder="TIME",
          help="Advance, clamp and unload per cut, e.g. 30s.", dimension="time", low=0,
          high=600, why="advancing, clamping and unloading take seconds to minutes, not ten hours",
          names=("job.handling_time",)),
    Field("change_time", "blade change time", "--change-time", placeholder="TIME",
          help="Time to change a worn blade, break-in included, e.g. 15min.", dimension="time",
          low=1, high=600,
          why="a blade change takes minutes: under one is not a change, over ten hours none is",
          names=("job.change_time",)),
    Field("economics", "cost per cut", "--economics",
          help="Also show what the cut costs at the recommended, cheapest and fastest band speeds."),
    Field("run", "run speed", "--run", placeholder="WORD",
          help="Quote at this band speed: recommended, cost (cheapest) or production (fastest).",
          choices=("recommended", "cost", "production")),
    Field("stock_price", "stock price", low=0, high=10_000_000,
          why="a bar of stock costs under ten million in any common currency",
          names=("stock.price",)),
    Field("price_per_kg", "price per kg", low=0, high=1_000_000,
          why="even precious alloys cost under a million per kg in any common currency",
          names=("stock.price_per_kg",)),
    Field("job_name", "job name", dimension="text", high=200, why=_LINE, names=("job.name",)),
    Field("customer", "customer", dimension="text", high=200, why=_LINE,
          names=("job.customer",)),
    Field("due", "due date", dimension="text", high=200, why=_LINE, names=("job.due",)),
    Field("stock_file", "stock file", dimension="text", high=200, why="a file name",
          names=("job.stock_file",)),
    Field("part_name", "part name", dimension="text", high=200, why=_LINE, names=("part.name",)),
    Field("tolerance", "tolerance", dimension="text", high=200, why=_LINE,
          names=("part.tolerance",)),
    Field("drawing", "drawing", dimension="text", high=200, why=_LINE, names=("part.drawing",)),
    # -- a materials file (sawplan/materials.py): one row of data/materials.csv's columns
    Field("material_key", "material key", dimension="text", high=60,
          why="catalogue keys are short", names=("materials.key",)),
    Field("designation", "designation", dimension="text", high=200, why=_LINE,
          names=("materials.designation", "materials.standard", "materials.notes")),
    Field("uns", "UNS number", dimension="text", high=12,
          why="a UNS number is a letter and five digits", names=("materials.uns",)),
    Field("density", "density", dimension="density", low=500, high=23_000,
          why="lithium, the lightest metal, is 534 kg/m³ and osmium, the densest, 22,590 kg/m³ "
              "(memory)", names=("materials.density_kg_m3",)),
    Field("hardness", "hardness", dimension="hardness", low=1, high=800,
          why="Brinell numbers run from a few for lead to about 700 for hardened tool steel "
              "(memory)", names=("materials.hardness_hb",)),
    Field("unit_energy", "unit cutting energy", dimension="energy_density", low=0.05, high=50,
          why="metals take from about 0.3 J/mm³ (magnesium) to under 10 J/mm³ (superalloys) to "
              "cut, wear factors included (memory)", names=("materials.unit_energy_j_mm3",)),
    Field("cutting_rate", "cutting rate", dimension="rate", low=10, high=1_000_000,
          why="band saws cut metal at from about 1 cm²/min (hard alloys, small saws) to a few "
              "hundred (aluminium); 10,000 cm²/min is no band saw (common practice)",
          names=("materials.cutting_rate_cm2_min",)),
    # -- the station (`sawplan serve`)
    Field("host", "address to serve", "--host", placeholder="ADDRESS",
          help="Address to listen on: 127.0.0.1 serves this computer only (no key needed); "
               "0.0.0.0 or the shop network's address serves the network (keys needed).",
          dimension="text", high=255, why="an IP address or a host name"),
    Field("port", "port", "--port", placeholder="PORT", help="TCP port to listen on.", low=1,
          high=65_535, integer=True, why="TCP ports run from 1 to 65,535"),
    Field("keys", "new keys", "--keys",
          help="Make a new station key and office key (shown once, stored hashed) and stop; "
               "the keys made before stop working."),
    Field("proxied", "behind a reverse proxy", "--proxied",
          help="Every request comes through a reverse proxy on this computer (TLS in front): "
               "treat each one as a network request, so every page needs a key."),
    Field("send", "send to the saw", "--send",
          help="Send the planned cuts to the saw's queue on the station (`sawplan serve`)."),
    Field("remnant_length", "remnant length", dimension="length", low=1, high=100_000,
          why="an off-cut under 1 mm is swarf; no bar is longer than 100 m",
          names=("remnants.length_mm",)),
    Field("rack", "rack place", dimension="text", high=60, why=_SHORT_TEXT,
          names=("remnants.rack", "stock.location")),
    Field("tap_said", "what a tap saved", dimension="text", high=2000,
          why="the station's own sentence about one tap: a line or a few",
          names=("taps.said",)),
    Field("tap_change", "what a correction changed", dimension="text", high=4000,
          why="the old and new values of one cut entry, or the whole entry taken back (JSON)",
          names=("taps.change",)),
    Field("remnant_credit", "rack credit", dimension="text", high=12,
          choices=("bar-price", "none"),
          why="remnants back on the rack are credited at their bar's price per length, or not",
          names=("job.remnant_credit",)),
)
# fmt: on

FIELDS: MappingProxyType[str, Field] = MappingProxyType({f.key: f for f in _TABLE})
BY_OPTION: MappingProxyType[str, Field] = MappingProxyType(
    {s: f for f in _TABLE for s in (f.option, f.short, f.negative) if s}
)
BY_NAME: MappingProxyType[str, Field] = MappingProxyType(
    {name: f for f in _TABLE for name in f.names}
)


def field(key: str) -> Field:
    """The field called ``key`` (a programming error when there is none)."""
    return FIELDS[key]


def field_for(name: str) -> Field | None:
    """The field stored as ``name`` (``"TABLE.column"``, e.g. ``"blades.price"``), if any."""
    return BY_NAME.get(name)


def check(key: str | Field, value: float, *, words: str | None = None) -> float:
    """``value`` (core unit) when inside the field's range, else BadDataError in one line.

    The line names the field in the user's words, the range and the unit:
    ``band speed: must be from 3 to 2,000 m/min, got 1,000,000,000 m/min``.
    """
    f = key if isinstance(key, Field) else FIELDS[key]
    name = words or f.words
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise BadDataError(f"expected a number, got {value!r}", field=name)
    if isinstance(value, int) and abs(value) > 1e15:  # beyond any range, and beyond a float
        raise BadDataError(
            f"must be {f.range_text()}, got a number of {len(str(abs(value))):,} digits",
            field=name,
        )
    if not math.isfinite(value):
        raise BadDataError(f"must be {f.range_text()}, got {value}", field=name)
    if f.integer and value != int(value):
        raise BadDataError(f"expected a whole number, got {_number(value)}", field=name)
    too_low = f.low is not None and (value <= f.low if f.above else value < f.low)
    too_high = f.high is not None and value > f.high
    if too_low or too_high:
        raise BadDataError(f"must be {f.range_text()}, got {f.show(value)}", field=name)
    return value


def check_count(key: str | Field, value: int, *, words: str | None = None) -> int:
    """A whole number inside the field's range (before it reaches the database)."""
    check(key, value, words=words)
    return int(value)


def check_text(
    key: str | Field, value: str | None, *, words: str | None = None, collapse: bool = True
) -> str | None:
    """Text with white space collapsed, refused when too long or holding control characters.

    ``collapse=False`` keeps the text as it is (a file name; a value already stored) and
    refuses line breaks and tabs with the other control characters.
    """
    f = key if isinstance(key, Field) else FIELDS[key]
    name = words or f.words
    if value is None:
        return None
    text = " ".join(str(value).split()) if collapse else str(value)
    if has_control(text):
        raise BadDataError("must not hold control characters", field=name)
    if f.high is not None and len(text) > f.high:
        raise BadDataError(f"must be {f.range_text()}, got {len(text):,} characters", field=name)
    return text


# Characters no stored text holds: C0 and C1 controls (a terminal runs ESC sequences), DEL,
# the line and paragraph separators, and the bidirectional overrides and isolates that
# make text read in another order than it is stored.
CONTROL = re.compile("[\x00-\x1f\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069]")


def has_control(text: str) -> bool:
    """Whether ``text`` holds a character of ``CONTROL``."""
    return CONTROL.search(text) is not None


def check_choice(key: str | Field, value: str, *, words: str | None = None) -> str:
    """One of the field's words (case and spaces ignored), else a line listing them."""
    import difflib

    f = key if isinstance(key, Field) else FIELDS[key]
    word = value.strip().lower()
    if word in f.choices:
        return word
    close = difflib.get_close_matches(word, f.choices, n=1)
    raise BadDataError(
        f"must be one of {', '.join(f.choices)}, got {value!r}",
        field=words or f.words,
        hint=f"did you mean {close[0]}?" if close else None,
    )


def parse(
    key: str | Field,
    text: str | float,
    *,
    default_unit: str | None = None,
    words: str | None = None,
) -> float:
    """User text in any unit of the field's dimension, in the core unit, range-checked."""
    from sawplan.units import to_core

    f = key if isinstance(key, Field) else FIELDS[key]
    name = words or f.words
    if f.dimension is None or f.is_text:
        try:
            value = float(str(text).strip())
        except ValueError:
            raise BadDataError(f"expected a number, got {text!r}", field=name) from None
    else:
        try:
            value = to_core(text, f.dimension, field=name, default_unit=default_unit)
        except BadDataError:  # beyond any plausible magnitude: say what is plausible
            raise BadDataError(
                f"must be {f.range_text()}, got {str(text).strip()!r}", field=name
            ) from None
    return check(f, value, words=name)


# --- showing values -------------------------------------------------------------------------

# units a range reads best in, smallest first: (label, factor from the core unit)
_LADDERS: dict[str, tuple[tuple[str, float], ...]] = {
    "length": (("mm", 1.0), ("m", 1000.0)),
    "area": (("mm²", 1.0), ("cm²", 100.0), ("m²", 1e6)),
    "time": (("min", 1.0), ("h", 60.0)),
    "speed": (("m/min", 1.0),),
    "feed": (("mm/min", 1.0),),
    "power": (("W", 1.0), ("kW", 1000.0)),
    "force": (("N", 1.0), ("kN", 1000.0)),
    "stress": (("MPa", 1.0),),
    "rate": (("cm²/min", 100.0),),
    "density": (("kg/m³", 1.0),),
    "hardness": (("HB", 1.0),),
    "energy_density": (("J/mm³", 1.0),),
}


def _shown_unit(dimension: str | None, value: float) -> tuple[str, float]:
    ladder = _LADDERS.get(dimension or "", (("", 1.0),))
    chosen = ladder[0]
    for label, factor in ladder:
        if abs(value) >= factor * (10 if label == "m" else 1):
            chosen = (label, factor)
    return chosen


def _number(v: float) -> str:
    """Plain digits with thousands separators; the rare absurd value in short form."""
    if v != 0 and not 1e-4 <= abs(v) < 1e12:
        return f"{v:.3g}"
    if float(v).is_integer():
        return f"{int(v):,}"
    return f"{v:,.6g}" if abs(v) >= 1 else f"{v:.4g}"
