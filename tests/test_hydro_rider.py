"""Where the rider stands (mast move) and the stabilizer shim for a wanted lift."""

from __future__ import annotations

import pytest
from test_hydro import DEMO

from geomgen.hydro import analyse_spec, format_hydro
from geomgen.hydro.rider import solve_shim
from geomgen.spec import load_spec, load_spec_text


@pytest.fixture(scope="module")
def demo():
    return analyse_spec(load_spec(DEMO))


def test_mast_move_puts_the_centre_of_pressure_under_the_rider(demo):
    st = demo.stance
    assert st.cruise_kmh == 22.0 and st.rider_from_mast_mm == -240.0
    cruise = next(t for t in demo.trim if t.speed_kmh == 22.0)
    # after sliding the mast by the move, the foil's cp (fixed to the foil) is at the rider
    assert cruise.cp_from_mast_mm + st.mast_move_mm == pytest.approx(-240.0)
    assert [p["speed_kmh"] for p in st.per_speed] == [14.0, 18.0, 22.0, 26.0]
    for p, t in zip(st.per_speed, demo.trim):
        assert p["mast_move_mm"] == pytest.approx(-240.0 - t.cp_from_mast_mm)
    assert "slide the mast" in format_hydro(demo)


def test_shim_reaches_the_wanted_stabilizer_lift(demo):
    st = demo.stance
    assert st.stabilizer_lift_reached_kgf == pytest.approx(-2.0, abs=0.02)
    assert st.new_incidence_deg == pytest.approx(2.5 + st.shim_deg)
    # less down-force than now needs the leading edge up
    assert (st.shim_deg > 0) == (st.stabilizer_target_kgf > st.stabilizer_lift_now_kgf)
    # applied to the spec, the set trims with that stabilizer lift at cruise
    text = DEMO.read_text().replace("incidence = 2.5", f"incidence = {st.new_incidence_deg:.6f}")
    r = analyse_spec(load_spec_text(text))
    t = next(t for t in r.trim if t.speed_kmh == 22.0)
    assert t.lift_kgf["stabilizer"] == pytest.approx(-2.0, abs=0.02)


def test_solve_shim_on_a_line():
    d, got = solve_shim(lambda x: 10.0 + 3.0 * x, 1.0)
    assert d == pytest.approx(-3.0) and got == pytest.approx(1.0)
