"""Below the minimum chip thickness: a bounded removal share, and a head that cannot
load its teeth is a state, not a time.

Sources: minimum chip thickness 0.2-0.3 × the edge radius (Vogler, DeVor and Kapoor,
J. Manuf. Sci. Eng. 126 (2004) 685, from memory); below it the uncut layer is left to
the following teeth (Kim, Mayor and Ni, J. Manuf. Sci. Eng. 126 (2004) 710, from
memory), so removal falls but does not vanish; the floor share is sawplan's
calibration (memory).  Shop experience: a fine blade through a 7 in stainless billet
takes hours (common practice).
"""

from __future__ import annotations

import dataclasses
import json
import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from sawplan.cutting import compare, evaluate, recommend
from sawplan.cutting import constants as K
from sawplan.cutting.ploughing import (
    force_bite_mm,
    min_chip_thickness_mm,
    removal_share,
    teeth_the_head_can_load,
)
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw
from sawplan.sections import parse_section

CAT = load_catalogue()
SMALL = get_saw("small-horizontal")
BILLET = parse_section("round 7in")


def test_removal_share_at_its_anchor_points():
    floor = min_chip_thickness_mm(0.008, 0.25)
    assert floor == pytest.approx(0.002)  # 0.25 × 8 µm (Vogler et al. range 0.2-0.3)
    # at and above h_min every pass forms a chip (Kim et al.): the whole bite
    assert removal_share(floor, floor, 0.2) == 1.0
    assert removal_share(3 * floor, floor, 0.2) == 1.0
    # half the minimum chip thickness: 0.2 + 0.8 × 0.5 = 0.6 of the bite (derived)
    assert removal_share(floor / 2, floor, 0.2) == pytest.approx(0.6)
    # a vanishing bite still leaves the floor share: bounded, never zero
    assert removal_share(0.0, floor, 0.2) == pytest.approx(0.2)
    assert K.number("plough", "removal_floor") == 0.2


@given(st.floats(0.0, 0.01), st.floats(0.0005, 0.004), st.floats(0.05, 0.9))
def test_removal_share_is_bounded_and_never_falls_as_the_bite_grows(h, floor, rho0):
    share = removal_share(h, floor, rho0)
    assert rho0 - 1e-12 <= share <= 1.0
    assert removal_share(h * 1.1, floor, rho0) >= share - 1e-12
    # the time penalty h / (ρ·h) is at most 1/ρ0: never the months of the old h²/h_min rule
    if h > 0:
        assert 1.0 / share <= 1.0 / rho0 + 1e-9


def test_force_bite_and_stall_threshold():
    # linear edge-force model (derived): h = (F/n − F0)/(k_t·kerf); F/n ≤ F0 cannot bite
    assert force_bite_mm(350.0, 50.0, 3.6, 5000.0, 1.44) == pytest.approx(
        (350 / 50 - 3.6) / (5000 * 1.44)
    )
    assert force_bite_mm(350.0, 98.0, 3.6, 5000.0, 1.44) is None
    assert teeth_the_head_can_load(350.0, 3.6) == pytest.approx(97.2, abs=0.1)


def test_fine_pitch_through_a_stainless_billet_takes_hours_not_days():
    # common practice: a fine blade through a 7 in stainless billet on a small force-fed
    # saw takes hours; the recommendation takes minutes
    material = CAT.get("17-4PH")
    comparison = compare(material, BILLET, SMALL, "10/14")
    fine, rec = comparison.chosen, comparison.recommended
    assert not fine.stalled
    assert 90 <= fine.cut_time_min <= 24 * 60  # hours, not days
    assert 3 <= comparison.time_ratio <= 50  # a sane factor
    assert rec.cut_time_min < 60
    assert any("rubbing floor" in w for w in fine.warnings)


def test_a_blade_that_cannot_bite_is_stalled_not_timed():
    # 14 TPI puts 98 teeth in the 178 mm chord; 350 N cannot load them past ploughing
    result = evaluate(CAT.get("17-4PH"), BILLET, SMALL, "14")
    assert result.stalled
    assert result.cut_time_min is None and result.feed_mm_min is None
    assert result.cutting_rate_cm2_min is None
    assert result.stall_reason.startswith("will not cut: the head force (350 N)")
    assert "fit a coarser pitch or add feed force" in result.stall_reason
    assert result.warnings[0] == result.stall_reason
    assert result.breakin == ()


def test_stalled_cut_reads_in_json_as_null_time(cli):
    out = cli("cut", "17-4PH", "round", "7in", "--saw", "small-horizontal", "--pitch", "14",
              "--json")  # fmt: skip
    assert out.code == 0, out.err
    data = json.loads(out.out)
    assert data["stalled"] is True
    assert data["cut_time_min"] is None
    assert "will not cut" in data["stall_reason"]
    text = cli("cut", "17-4PH", "round", "7in", "--saw", "small-horizontal", "--pitch", "14",
               "--chart")  # fmt: skip
    assert text.code == 0, text.err
    assert "will not cut" in text.out and "No chart: the cut does not progress." in text.out
    assert "e+" not in text.out and "min per cut" not in text.out


def test_every_pitch_stalling_still_gives_one_clear_answer():
    from sawplan.cutting.plan import available

    feeble = dataclasses.replace(SMALL, head_force_n=10.0)  # the least a saw profile takes
    result = recommend(CAT.get("17-4PH"), BILLET, feeble)
    assert result.stalled and result.cut_time_min is None
    # the coarsest pitch made for the blade is the nearest to cutting
    assert math.isclose(result.tpi_coarse, min(p.tpi_coarse for p in available(feeble)))


def test_a_job_planned_on_a_saw_that_cannot_cut_it_is_refused():
    from sawplan.cutlist.jobfile.load import parse_job
    from sawplan.cutlist.plan.job import plan_job
    from sawplan.errors import BadDataError

    text = "\n".join(
        [
            "[job]",
            'name = "billet"',
            'kerf = "2mm"',
            "[[stock]]",
            'material = "17-4PH"',
            'section = "round 7in"',
            'length = "1m"',
            "count = 1",
            "[[part]]",
            'name = "disc"',
            'material = "17-4PH"',
            'section = "round 7in"',
            'length = "40mm"',
            "count = 2",
        ]
    )
    feeble = dataclasses.replace(SMALL, head_force_n=10.0)
    job = parse_job(text + "\n", CAT, file="job.toml")
    with pytest.raises(BadDataError) as err:
        plan_job(job, feeble, time_limit_s=2.0)
    assert "will not cut" in str(err.value)
