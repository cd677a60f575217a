"""Earth electrodes as lossy lines in the soil: the low-frequency limit of each is today's DC formula."""

from __future__ import annotations

import numpy as np
import pytest

from aerial.models import electrodes as el
from aerial.models.electrode_lines import buried_wire_line, rod_line, soil_gamma


def test_buried_wire_tends_to_sundes_dc_formula():
    # Sunde, Earth Conduction Effects (1949) ch. 3: R = rho/(pi l)[ln(2l/sqrt(2ad)) - 1] (from memory)
    line = buried_wire_line([0.1, 10.0], 10.0, 1e-3, 0.3, 100.0, 15.0)
    dc = float(el.sunde_buried_wire(10.0, 1e-3, 0.3, 100.0).resistance_ohm)
    assert line.impedance[0].real == pytest.approx(dc, rel=1e-4)
    assert abs(line.impedance[0].imag) < 1e-3 * dc


def test_rod_tends_to_dwights_formula():
    # IEEE Std 142, Dwight's rod formula: 2.44 m x 15.875 mm in 100 ohm m -> 39.88 ohm (check values, from memory)
    line = rod_line([1.0], 2.44, 0.0079375, 100.0, 15.0)
    assert line.impedance[0].real == pytest.approx(39.88, abs=0.01)


def test_soil_skin_depth_matches_the_textbook_formula():
    # good-conductor skin depth delta = sqrt(2 rho/(omega mu0)) (Ramo, Whinnery & Van Duzer; common practice):
    # Re(gamma) = 1/delta when the displacement current is negligible
    rho, f = 10.0, 100e3
    g, _ = soil_gamma(f, rho, 1.0)
    delta = np.sqrt(2 * rho / (2 * np.pi * f * 4e-7 * np.pi))
    assert float(g.real) == pytest.approx(1 / delta, rel=1e-3)


def test_a_long_wire_stops_helping_beyond_its_effective_length():
    """Consistency check: past the effective length more wire changes the impedance by under 10 %."""
    f = [1e6]
    short = buried_wire_line(f, 5.0, 1e-3, 0.15, 100.0, 15.0)
    l_eff = float(short.effective_length[0])
    at = buried_wire_line(f, l_eff, 1e-3, 0.15, 100.0, 15.0).impedance[0]
    far = buried_wire_line(f, 4 * l_eff, 1e-3, 0.15, 100.0, 15.0).impedance[0]
    assert abs(at - far) / abs(far) < 0.12
    half = buried_wire_line(f, 0.3 * l_eff, 1e-3, 0.15, 100.0, 15.0).impedance[0]
    assert abs(half - far) / abs(far) > 0.2
    # at low frequency the same wire keeps helping: the DC resistance falls roughly as 1/l
    lo = [buried_wire_line([10.0], n, 1e-3, 0.15, 100.0, 15.0).impedance[0].real for n in (10.0, 40.0)]
    assert lo[1] < 0.4 * lo[0]


def test_every_site_electrode_tends_to_its_dc_formula():
    from aerial.estimate.earth import earth_system, electrode_impedance
    from aerial.site.reader import Electrode, SoilSpec

    soil = SoilSpec("test", 15.0, 0.01, 0.005, 0.02, "invented soil for the limit check")
    kinds = [
        Electrode("rods", "e.r", 3, 2.4, 0.016, 3.0, 0.0),
        Electrode("buried_wires", "e.w", 8, 10.0, 1.628e-3, 0.0, 0.15, arrangement="radials"),
        Electrode("buried_wires", "e.p", 2, 12.0, 1.628e-3, 0.0, 0.3),
        Electrode("water_pipe", "e.p", 1, 20.0, 0.02, 0.0, 0.8),
    ]
    for e in kinds:
        dc = earth_system([e], soil)["resistance_ohm"]
        rf = electrode_impedance([e], soil, [1.0, 1e6])["impedance_ohm"]
        assert rf[0].real == pytest.approx(dc, rel=1e-3), e.kind
        assert abs(rf[1] - dc) > 1e-3 * dc  # and it does change at MF


def test_report_shows_impedance_and_effective_length(capsys, monkeypatch):
    import pathlib

    from aerial.cli import main

    # a site with ground of its own: the radials row (and its effective-length note) is offered there
    site = pathlib.Path(__file__).resolve().parents[2] / "site_examples" / "suburban_lot_service_line.toml"
    monkeypatch.delenv("COLUMNS", raising=False)  # piped: every table at its full width
    assert main(["report", str(site)]) == 0
    out = capsys.readouterr().out
    assert "effective length" in out and "add nothing at" in out and "lossy lines in the soil" in out


def test_consistency_rf_range_with_the_permittivity_varied_holds_the_fixed_permittivity_range():
    # consistency check: the range over conductivity and permittivity contains the range over conductivity alone
    # (the same runs are among its runs), and the permittivity does move the rod's RF resistance at 1.7 MHz
    from aerial.estimate.earth import resistance_bounds
    from aerial.site.reader import Electrode, SoilSpec

    soil = SoilSpec("dry", 7.0, 3e-4, 1e-4, 1e-3, "ITU-R P.368 curve 'dry ground'", 3.0, 15.0)
    rod = [Electrode("rods", "e.r", 1, 2.44, 0.015875, 0.0, 0.0)]
    f = [0.53e6, 1.7e6]
    both = resistance_bounds(rod, soil, f)
    fixed = resistance_bounds(rod, soil._replace(relative_permittivity_low=None, relative_permittivity_high=None), f)
    assert np.all(both["low_ohm"] <= fixed["low_ohm"] + 1e-9) and np.all(both["high_ohm"] >= fixed["high_ohm"] - 1e-9)
    assert both["high_ohm"][1] - both["low_ohm"][1] > fixed["high_ohm"][1] - fixed["low_ohm"][1]
