"""The receiving network solver against textbook tank and coupled-circuit relations.

Sources: F. E. Terman, Radio Engineers' Handbook, McGraw-Hill, 1943, section 3 (resonant
circuits: f0 = 1/(2π√(LC)), Q = ωL/R, bandwidth f0/Q, parallel resonant resistance Q²R ≈ QωL;
coupled circuits: critical coupling k_c = 1/√(Q1Q2), at which the secondary current is the
largest any coupling gives and the response is flat-topped, with a −3 dB bandwidth √2 times that
of one circuit) — relations from memory. The maximum-power condition (a load takes the most power
when it equals the source's resistance; through a tap, when the load reflected to the top, R/n²,
equals the rest of the tank's resonant resistance) is common practice. The tank example (100 µH
and 253.3 pF resonate at 1 MHz) is the usual handbook example, from memory; its figures are
worked here from the relations.
"""

import numpy as np
import pytest

from aerial.core.errors import ModelInputError
from aerial.models import network as net
from aerial.models import tank as tank_mod

TWO_PI = 2 * np.pi

# Textbook tank (handbook example, from memory): 100 µH, 253.3 pF -> 1.000 MHz; R = 6.283 Ω -> Q = 100,
# bandwidth 10 kHz, parallel resonant resistance Q·ωL = 62.83 kΩ.
L_TB, C_TB, F_TB = 100e-6, 253.3e-12, 1.000e6
R_TB = TWO_PI * F_TB * L_TB / 100.0


def test_parallel_tank_resonance_q_and_bandwidth():
    """A parallel tank fed from a very high impedance: resonance, resonant resistance and bandwidth."""
    p = net.NetworkParts("direct", L_TB, R_TB)
    big = 1e12 + 0j  # a current source: the aerial loads nothing
    c = net.tuning_capacitance_for(F_TB, big, p)
    assert float(c) == pytest.approx(C_TB, rel=2e-3)  # f0 = 1/(2π√(LC)), Terman (from memory)
    s = net.solve_network(F_TB, big, p, c)
    assert abs(float(s.top_impedance.real)) == pytest.approx(100 * TWO_PI * F_TB * L_TB, rel=2e-3)  # Q·ωL
    resp = net.detector_bandwidth(np.array([F_TB]), lambda f: np.abs(net.solve_network(f, big, p, c).top_voltage))
    assert float(resp.bandwidth[0]) == pytest.approx(F_TB / 100, rel=1e-2)  # f0/Q = 10 kHz
    assert float(resp.loaded_q[0]) == pytest.approx(100, rel=1e-2)


def test_series_resonance_of_the_aerial_capacitance_with_the_coil():
    """The coil in series with a capacitive source resonates at 1/(2π√(LC)); the voltage step-up is Q."""
    p = net.NetworkParts("direct", L_TB, 1e-9)
    w = TWO_PI * F_TB

    def za(f):
        return R_TB + 1 / (1j * TWO_PI * f * C_TB)

    grid = np.linspace(0.95e6, 1.05e6, 20001)
    v = np.abs(net.solve_network(grid, za(grid), p, 0.0).top_voltage)
    assert grid[np.argmax(v)] == pytest.approx(F_TB, rel=1e-3)  # series resonance
    at = float(np.abs(net.solve_network(F_TB, za(F_TB), p, 0.0).top_voltage))
    assert at == pytest.approx(w * L_TB / R_TB, rel=1e-2)  # |V_L|/V = ωL/R = Q = 100


def _double_tuned(k, q=50.0, f0=1e6, L=200e-6):
    """Two identical tanks of Q 50, the first fed by a current source, coupled by k; both tuned to f0."""
    c = 1 / ((TWO_PI * f0) ** 2 * L)
    r = TWO_PI * f0 * L / q
    p = net.NetworkParts("separate primary", L, r, primary_inductance=L, coupling_coefficient=k,
                         primary_resistance=r, primary_capacitance=c)
    return p, c


def test_critical_coupling_gives_the_largest_secondary_voltage_and_a_flat_top():
    q = 50.0
    kc = float(net.critical_coupling(q, q))
    assert kc == pytest.approx(0.02)  # k_c = 1/√(Q1Q2), Terman (from memory)
    big = 1e12 + 0j
    ks = np.linspace(0.2, 3.0, 57) * kc
    peak = [float(np.abs(net.solve_network(1e6, big, _double_tuned(k)[0], _double_tuned(k)[1]).top_voltage)) for k in ks]
    assert ks[int(np.argmax(peak))] == pytest.approx(kc, rel=0.06)  # the most secondary voltage at k_c
    p, c = _double_tuned(kc)
    grid = np.linspace(0.97e6, 1.03e6, 6001)
    v = np.abs(net.solve_network(grid, big, p, c).top_voltage)
    v0 = float(np.abs(net.solve_network(1e6, big, p, c).top_voltage))
    assert v.max() <= v0 * 1.01  # flat-topped: no hump above the centre at k_c
    resp = net.detector_bandwidth(np.array([1e6]), lambda f: np.abs(net.solve_network(f, big, p, c).top_voltage))
    assert float(resp.bandwidth[0]) == pytest.approx(np.sqrt(2) * 1e6 / q, rel=0.03)  # √2·f0/Q
    p2, c2 = _double_tuned(2.5 * kc)
    v2 = np.abs(net.solve_network(grid, big, p2, c2).top_voltage)
    assert v2.max() > 1.3 * float(np.abs(net.solve_network(1e6, big, p2, c2).top_voltage))  # over-coupled: two humps


def test_a_tapped_load_takes_the_most_power_when_matched():
    """Maximum power: a load R_L at tap n takes the most when R_L/n² equals the rest of the tank (common practice)."""
    f0, L, q = 1e6, 200e-6, 100.0
    r = TWO_PI * f0 * L / q
    rp = q * TWO_PI * f0 * L  # the tank's own resonant resistance
    r_load = 5e3
    n_match = np.sqrt(r_load / rp)  # R_L/n² = R_p
    big = 1e12 + 0j
    taps = np.linspace(0.05, 0.6, 221)
    power = []
    for n in taps:
        p = net.NetworkParts("direct", L, r, detector_tap=float(n))
        c = net.tuning_capacitance_for(f0, big, p, 1 / r_load)
        v = float(np.abs(net.solve_network(f0, big, p, c, 1 / r_load, emf=1e12).detector_voltage))
        power.append(v**2 / r_load)
    best = taps[int(np.argmax(power))]
    assert best == pytest.approx(n_match, rel=0.03)
    # at the match the load takes I²R_p/4 (1 A injected): half the current's power goes to the load
    assert max(power) == pytest.approx(rp / 4, rel=0.02)


@pytest.mark.parametrize("arrangement, extra", [
    ("direct", {}),
    ("coil tap", {"aerial_tap": 0.3}),
    ("series capacitor", {"series_capacitance": 50e-12}),
    ("separate primary", {"primary_inductance": 30e-6, "coupling_coefficient": 0.4}),
])
def test_consistency_check_the_network_reproduces_the_closed_form_tank(arrangement, extra):
    """Consistency check (project closed forms, aerial.models.tank): tuning capacitance and loaded Q agree
    where the closed forms hold (tight windings, detector at the top, loaded Q well above 1)."""
    f = np.array([600e3, 1000e3, 1500e3])
    L, qu = 240e-6, 150.0
    ra, ca = 30.0, 150e-12
    za = ra + 1 / (1j * TWO_PI * f * ca)
    rc = TWO_PI * f * L / qu
    g_det = 1 / 200e3
    rp = TWO_PI * f * extra.get("primary_inductance", 0.0) / qu
    p = net.NetworkParts(arrangement, L, lambda x: TWO_PI * x * L / qu, primary_resistance=lambda x: TWO_PI * x
                         * extra.get("primary_inductance", 0.0) / qu, **extra)
    t = tank_mod.tank_coupling(arrangement, f, ra, za.imag, L, rc, extra.get("series_capacitance"),
                               extra.get("aerial_tap"), extra.get("primary_inductance"),
                               extra.get("coupling_coefficient"), rp)
    c_closed = tank_mod.capacitance_needed(f, t.coil_admittance, t.aerial_admittance)
    c_net = net.tuning_capacitance_for(f, za, p, g_det)
    # the network shares the coil's loss along its turns; the closed form puts it all above the tap
    np.testing.assert_allclose(c_net, c_closed, rtol=1e-3)
    b = -np.imag(t.coil_admittance)
    q_closed = tank_mod.loaded_q(b / np.real(t.coil_admittance), b / np.real(t.aerial_admittance), b / g_det)

    def resp(x):
        zx = ra + 1 / (1j * TWO_PI * x * ca)
        return np.abs(net.solve_network(x, zx, p, c_net, g_det).top_voltage)

    q_net = net.detector_bandwidth(f, resp).loaded_q
    # the closed form takes the coupled aerial's admittance at f0 only; the network follows it across the
    # passband (a separate primary's reflected impedance changes fastest: up to 5 % at Q 45)
    np.testing.assert_allclose(q_net, q_closed, rtol=0.05)


def test_section_inductances_add_up_to_the_whole_winding():
    block = net.block_inductance_tight(300e-6)
    m = net.section_inductances([0.1, 0.4, 1.0], block)
    assert m.sum() == pytest.approx(300e-6)
    with pytest.raises(ModelInputError, match="taps must increase"):
        net.section_inductances([0.5, 0.4, 1.0], block)


def test_bad_parts_are_refused_with_their_names():
    with pytest.raises(ModelInputError, match="'magnetic' is not a valid coupling arrangement"):
        net.check_parts(net.NetworkParts("magnetic", 1e-4, 1.0))
    with pytest.raises(ModelInputError, match="needs a positive aerial_tap"):
        net.check_parts(net.NetworkParts("coil tap", 1e-4, 1.0))
    with pytest.raises(ModelInputError, match="not a valid trap"):
        net.trap_source(1e6, 20 - 800j, "shunt", 1e-4, 1e-10, 1.0)


def test_a_parallel_trap_in_the_lead_blocks_its_frequency_only():
    f_trap = 1e6
    L, c = 100e-6, 1 / ((TWO_PI * f_trap) ** 2 * 100e-6)
    za = 25 - 800j
    _, z_at = net.trap_source(f_trap, za, "parallel", L, c, 2.0)
    _, z_off = net.trap_source(1.3e6, za, "parallel", L, c, 2.0)
    assert abs(z_at) > 100 * abs(za)  # (ωL)²/R at resonance
    assert abs(z_off) < 3 * abs(za)


@pytest.mark.parametrize("parts", [
    net.NetworkParts("direct", 240e-6, 6.0),
    net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=0.3, aerial_tap=0.5,
                     block=lambda x: 240e-6 * float(x) ** 1.6),  # a winding less than tightly coupled
    net.NetworkParts("series capacitor", 240e-6, 6.0, detector_tap=0.5, series_capacitance=47e-12,
                     self_capacitance=3e-12),
    net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=0.7, primary_inductance=24e-6,
                     coupling_coefficient=0.3, primary_resistance=1.0),
], ids=lambda p: p.arrangement)
def test_consistency_check_retuned_detector_voltage_matches_a_full_solve(parts):
    """Every tuning of an n × n table added to one bare solve as a change of rank two (the Sherman–Morrison–
    Woodbury identity, Golub & Van Loan, Matrix Computations, 1996, section 2.1.3) gives what solving each
    tuned network afresh gives (consistency check on invented parts)."""
    f = np.linspace(550e3, 1650e3, 7)
    za = 40.0 - 1j / (2 * np.pi * f * 150e-12)
    c = np.linspace(20e-12, 300e-12, 7)
    g = np.geomspace(1e-6, 4e-4, 7)
    full = net.solve_network(f[np.newaxis, :], za[np.newaxis, :], parts, c[:, np.newaxis], g[:, np.newaxis])
    quick = net.retuned_detector_voltage(net.solve_network(f, za, parts), f[np.newaxis, :], c[:, np.newaxis],
                                         g[:, np.newaxis])
    assert np.allclose(quick, full.detector_voltage, rtol=1e-9, atol=0)


def test_consistency_check_a_stack_of_networks_solves_as_each_one_alone():
    """Networks of every arrangement and tap solved as one stack give what solving each alone gives, to the
    last bit (consistency check on invented parts: the same assembly, systems of one shape solved together)."""
    q = 150.0
    stack = []
    for m in (0.1, 0.3, 1.0):
        stack.append(net.NetworkParts("direct", 240e-6, lambda f: TWO_PI * f * 240e-6 / q, detector_tap=m))
        for t in (0.05, 0.3, 0.5):
            stack.append(net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=m, aerial_tap=t,
                                          block=lambda x: 240e-6 * float(x) ** 1.6))
        stack.append(net.NetworkParts("series capacitor", 240e-6, 6.0, detector_tap=m, series_capacitance=47e-12,
                                      self_capacitance=3e-12))
        stack.append(net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=m, primary_inductance=24e-6,
                                      coupling_coefficient=0.3, primary_resistance=1.0))
        stack.append(net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=m, primary_inductance=24e-6,
                                      coupling_coefficient=0.05, primary_capacitance=100e-12))
    f = np.linspace(550e3, 1650e3, 4)
    za = 40.0 - 1j / (2 * np.pi * f * 150e-12)
    c = np.geomspace(20e-12, 300e-12, len(stack))[:, np.newaxis] * np.ones(f.size)
    together = net.solve_network_stack(f, za, stack, c, 2e-4)
    for p, parts in enumerate(stack):
        alone = net.solve_network(f, za, parts, c[p], 2e-4)
        for got, want in zip(together, alone):
            assert np.allclose(got[p], want, rtol=1e-12, atol=0)


def test_consistency_check_a_stack_solved_for_some_fields_gives_the_full_solves():
    """A stack solved for some fields of the solution only gives those fields to the last bit, the others None
    (consistency check on invented parts: each right-hand side is eliminated on its own)."""
    stack = [net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=m, aerial_tap=0.2) for m in (0.1, 0.5, 1.0)]
    stack += [net.NetworkParts("series capacitor", 240e-6, 6.0, detector_tap=0.3, series_capacitance=47e-12),
              net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=0.7, primary_inductance=24e-6,
                               coupling_coefficient=0.3, primary_resistance=1.0)]
    f = np.linspace(550e3, 1650e3, 5)
    za = 40.0 - 1j / (2 * np.pi * f * 150e-12)
    full = net.solve_network_stack(f, za, stack, 90e-12, 2e-4)
    for wanted in (("top_impedance",), ("detector_voltage",), ("detector_voltage", "detector_impedance"),
                   ("top_per_detector_current", "primary_voltage")):
        some = net.solve_network_stack(f, za, stack, 90e-12, 2e-4, outputs=wanted)
        for name in net.NetworkSolution._fields:
            if name in wanted:
                assert np.array_equal(getattr(some, name), getattr(full, name))
            else:
                assert getattr(some, name) is None
    one = net.solve_network_stack(f, za, stack[:1], 90e-12, 2e-4, outputs=("detector_impedance",))
    assert np.array_equal(one.detector_impedance, full.detector_impedance[:1]) and one.top_voltage is None


def test_consistency_check_the_detector_voltage_alone_is_the_full_solves():
    """The detector voltage solved for the aerial's EMF alone, and the tuning capacitance from the top's
    impedance alone, are the full solve's figures to the last bit (consistency check on invented parts)."""
    f = np.linspace(550e3, 1650e3, 9)
    za = 40.0 - 1j / (2 * np.pi * f * 150e-12)
    for parts in (net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=0.3, aerial_tap=0.5),
                  net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=0.7, primary_inductance=24e-6,
                                   coupling_coefficient=0.3, primary_resistance=1.0)):
        full = net.solve_network(f, za, parts, 120e-12, 3e-4)
        assert np.array_equal(net.detector_response(f, za, parts, 120e-12, 3e-4), full.detector_voltage)
        bare = net.solve_network(f, za, parts, 0.0, 3e-4)
        assert np.array_equal(net.tuning_capacitance_for(f, za, parts, 3e-4),
                              -np.imag(1.0 / bare.top_impedance) / (2 * np.pi * f))


@pytest.mark.parametrize("arrangement", ["direct", "series capacitor", "coil tap", "separate primary"])
def test_consistency_check_many_edges_pinned_then_replayed_are_the_plain_bisections(arrangement, monkeypatch):
    """For many edges at once the -3 dB search halves a few times, pins each crossing by regula falsi and
    replays the remaining halvings from it: the edges must be the plain bisection's, bit for bit
    (consistency check on invented networks: 150 tunings of a network with both loadings)."""
    parts = net.NetworkParts(arrangement, 240e-6, lambda f: TWO_PI * f * 240e-6 / 150.0, detector_tap=0.6,
                             aerial_tap=0.25, series_capacitance=60e-12, primary_inductance=60e-6,
                             coupling_coefficient=0.3)
    f0 = np.geomspace(5.3e5, 1.7e6, 150)

    def za(f):
        return 30.0 - 1j / (TWO_PI * f * 180e-12)

    g = np.concatenate([np.full(75, 2e-4), np.full(75, 1e-6)])
    c = np.maximum(net.tuning_capacitance_for(f0, za(f0), parts, g), 1e-12)

    def response(f):
        return np.abs(net.detector_response(f, za(f), parts, c, g))

    pinned = net.detector_bandwidth(f0, response)
    monkeypatch.setattr(net, "EDGE_OPENING_HALVINGS", net.EDGE_MAX_ITER)  # every halving evaluated
    plain = net.detector_bandwidth(f0, response)
    for got, want in zip(pinned, plain):
        assert np.array_equal(got, want)


def test_consistency_check_many_edges_land_on_a_crossing_where_the_response_crosses_the_level_often():
    """A response rippling across the -3 dB level near its edges (several crossings in the bracket the opening
    halvings leave): every edge of the pinned-then-replayed search still lies within the tolerance of a crossing,
    the response solved on either side of it landing on either side of the level (consistency check on an
    invented response: a single-tuned curve of Q 50 with a 5 % ripple of period 0.4 % of the tuned frequency)."""
    f0 = np.geomspace(5.3e5, 1.7e6, 150)

    def response(f):  # f: any leading axes, then one value per tuning
        u = np.asarray(f, dtype=float) / f0
        return (1.0 + 0.05 * np.sin(TWO_PI * u / 0.004)) / np.sqrt(1.0 + (50.0 * (u - 1.0 / u)) ** 2)

    r = net.detector_bandwidth(f0, response)
    ref = response(f0) / np.sqrt(2.0)
    edges = np.stack([r.low_edge, r.high_edge])
    below, above = response(edges * (1.0 - 1e-9)), response(edges * (1.0 + 1e-9))
    assert np.all((below >= ref) != (above >= ref))  # a crossing between them, at every edge
    assert np.all((r.low_edge < f0 * 0.995) & (r.high_edge > f0 * 1.005))  # near the curve's own edges


def _full_nodal_solution(f, za, parts, c_tune, g_det):
    """The unreduced modified nodal system (Ho, Ruehli and Brennan, 1975, from memory), written out plainly
    here, solved by LAPACK (numpy.linalg.solve) one frequency at a time: the top voltage and detector voltage
    per volt of EMF, and the driving-point impedances at the top and at the detector."""
    taps = sorted({1.0, parts.detector_tap} | ({parts.aerial_tap} if parts.arrangement == "coil tap" else set()))
    k = len(taps)
    block = parts.block or net.block_inductance_tight(parts.coil_inductance)
    m = net.section_inductances(taps, block)
    frac = np.diff([0.0] + taps)
    extra = parts.arrangement in ("series capacitor", "separate primary")
    nodes = k + extra
    n = nodes + k + (parts.arrangement == "separate primary")
    top, det = k - 1, taps.index(parts.detector_tap)
    aer = {"direct": top, "coil tap": taps.index(parts.aerial_tap or 1.0)}.get(parts.arrangement, k)
    out = []
    for fi, zi in zip(f, za):
        w = TWO_PI * fi
        r = parts.coil_resistance(fi) if callable(parts.coil_resistance) else parts.coil_resistance
        a = np.zeros((n, n), complex)
        a[aer, aer] += 1 / zi
        a[top, top] += 1j * w * (c_tune + parts.self_capacitance)
        a[det, det] += g_det
        if parts.arrangement == "series capacitor":
            y = 1j * w * parts.series_capacitance
            a[np.ix_([top, k], [top, k])] += [[y, -y], [-y, y]]
        for s in range(k):  # section s from tap s-1 (earth for s = 0) up to tap s
            a[s, nodes + s] = a[nodes + s, s] = 1.0
            if s:
                a[s - 1, nodes + s] = a[nodes + s, s - 1] = -1.0
            a[nodes + s, nodes:nodes + k] -= 1j * w * m[s]
            a[nodes + s, nodes + s] -= r * frac[s]
        if parts.arrangement == "separate primary":
            lp, row = parts.primary_inductance, n - 1
            mut = parts.coupling_coefficient * np.sqrt(lp * parts.coil_inductance) * m.sum(axis=1) / m.sum()
            a[k, row] = a[row, k] = 1.0
            a[row, row] -= parts.primary_resistance + 1j * w * lp
            a[row, nodes:nodes + k] -= 1j * w * mut
            a[nodes:nodes + k, row] -= 1j * w * mut
            if parts.primary_capacitance is not None:
                a[k, k] += 1j * w * parts.primary_capacitance
        b = np.zeros((n, 3), complex)
        b[aer, 0], b[top, 1], b[det, 2] = 1 / zi, 1.0, 1.0
        x = np.linalg.solve(a, b)
        out.append((x[top, 0], x[det, 0], x[top, 1], x[det, 2]))
    return np.array(out).T


@pytest.mark.parametrize("parts", [
    net.NetworkParts("direct", 240e-6, 6.0, detector_tap=0.37, self_capacitance=4e-12),
    net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=0.5, aerial_tap=0.05),  # tight: a singular M
    net.NetworkParts("coil tap", 240e-6, 6.0, detector_tap=0.3, aerial_tap=0.6, block=lambda x: 240e-6 * x ** 1.6),
    net.NetworkParts("series capacitor", 240e-6, 6.0, detector_tap=0.5, series_capacitance=47e-12),
    net.NetworkParts("separate primary", 240e-6, 6.0, detector_tap=0.7, primary_inductance=240e-6,
                     coupling_coefficient=0.95, primary_resistance=1.0, primary_capacitance=100e-12),
])
def test_consistency_check_the_reduced_solve_is_lapacks_solution_of_the_full_nodal_system(parts):
    """The solver eliminates the winding's node voltages exactly before solving; its figures must be
    LAPACK's solution of the whole modified nodal system within 1e-12 (consistency check on invented parts,
    the reference being numpy.linalg.solve on the system written out above)."""
    f = np.geomspace(150e3, 1.8e6, 40)
    for za in (40.0 - 1j / (TWO_PI * f * 150e-12), 5.0 - 1j / (TWO_PI * f * 2000e-12)):
        for c, g in ((0.0, 0.0), (120e-12, 3e-4), (30e-12, 0.05)):
            s = net.solve_network(f, za, parts, c, g)
            want = _full_nodal_solution(f, za, parts, c, g)
            for got, ref in zip((s.top_voltage, s.detector_voltage, s.top_impedance, s.detector_impedance), want):
                assert np.allclose(got, ref, rtol=1e-12, atol=0)


def test_an_exactly_singular_reduced_system_raises_as_lapack_does():
    """A zero pivot (or a zero 2 x 2 determinant) raises numpy.linalg.LinAlgError, as numpy.linalg.solve does
    for an exactly singular system, instead of an infinity and a printed warning; a regular 3 x 3 system gives
    numpy.linalg.solve's answer."""
    from aerial.models.network import _eliminate

    with pytest.raises(np.linalg.LinAlgError):
        _eliminate([[1.0, 2.0], [2.0, 4.0]], [[1.0], [1.0]])
    with pytest.raises(np.linalg.LinAlgError):
        _eliminate([[1.0, 2.0, 3.0], [2.0, 4.0, 6.0], [0.0, 1.0, 1.0]], [[1.0], [1.0], [1.0]])
    a = [[1.0, 2.0, 0.0], [2.0, 1.0, 1.0], [0.0, 1.0, 3.0]]
    x = [float(np.real(v[0])) for v in _eliminate(a, [[1.0], [1.0], [1.0]])]
    assert np.allclose(x, np.linalg.solve(a, [1.0, 1.0, 1.0]), rtol=1e-15, atol=0)


def test_consistency_check_coils_each_with_their_own_aerial_tap_solve_as_each_tap_alone():
    """A column of coils, each with its own aerial tap, solved in one go gives, row by row, what solving the
    coils of each tap alone gives, to the last bit (consistency check on invented parts, tight and loose
    windings); taps that would change the winding's layout are refused."""
    f = np.linspace(550e3, 1650e3, 5)
    za = 40.0 - 1j / (2 * np.pi * f * 150e-12)
    taps = np.array([0.05, 0.3, 0.05, 0.5, 0.2, 0.3])[:, np.newaxis]
    coils = np.geomspace(100e-6, 600e-6, taps.size)[:, np.newaxis]
    for block in (None, lambda x: 240e-6 * float(x) ** 1.6):
        together = net.tuning_capacitance_for(f, za, net.NetworkParts(
            "coil tap", coils, lambda f_: TWO_PI * f_ * coils / 150.0, aerial_tap=taps, block=block), 2e-4)
        for t in np.unique(taps):
            rows = np.flatnonzero(taps[:, 0] == t)
            L = coils[rows]
            alone = net.tuning_capacitance_for(f, za, net.NetworkParts(
                "coil tap", L, lambda f_: TWO_PI * f_ * L / 150.0, aerial_tap=float(t), block=block), 2e-4)
            assert np.array_equal(together[rows], alone)
    with pytest.raises(ModelInputError, match="one layout"):
        net.tuning_capacitance_for(f, za, net.NetworkParts("coil tap", coils[:2], 6.0, detector_tap=0.4,
                                                           aerial_tap=np.array([[0.2], [0.6]])))
