"""Full-wave thin-wire solver: method of moments for straight wires over ground.

Frame: metres, x east, y north, z up; the ground is the plane z = 0.

Formulation: the mixed-potential electric-field integral equation (EFIE) for
thin wires with the reduced kernel, triangle (rooftop) basis functions and
Galerkin testing ([1]_, [2]_), images in the ground plane, a delta-gap feed,
distributed skin-effect impedance of the wire and the lumped earth-electrode
resistance. See :mod:`aerial.models.fullwave_geometry` for the topology and
:mod:`aerial.models.fullwave_kernel` for the matrix fill.

Ground models (``ground``):

* ``"perfect"`` (default): a perfectly conducting plane, exact images.
* ``"lossy"``: the exact half-space: the field reflected by a soil of complex
  permittivity eps_c = eps_r - j sigma/(omega eps0) as Sommerfeld integrals,
  the quasi-static image in closed form and the remainder from tables over
  distance and angle (:mod:`aerial.models.sommerfeld`,
  :mod:`aerial.models.fullwave_halfspace`). Valid at any height; the
  ground-loss resistance (soil absorption under the aerial) follows from the
  power balance of the solved currents.
* ``"reflection-coefficient"``: the fast approximation: the image of each
  basis function is scaled by the Fresnel plane-wave reflection coefficients
  at the specular angle between the two basis functions' centres, the
  horizontal current by R_h and the vertical current and charge by R_v
  ([3]_, [4]_). It is a far-field approximation, close to the exact
  treatment for wires a quarter wavelength or more above the soil and rough
  below about a tenth of a wavelength (nearly every receiving aerial at
  LF/MF), so the result then carries a warning.

Validity: thin wires (radius << piece length << wavelength, radius << wavelength),
all wires above the ground plane, the feed at the junction of the aerial and
the earth side. Out-of-range conditions come back in ``warnings``.

References
----------
.. [1] S. M. Rao, D. R. Wilton and A. W. Glisson, "Electromagnetic scattering
   by surfaces of arbitrary shape", IEEE Trans. Antennas Propag. 30(3),
   409-418, 1982 (triangle basis, mixed-potential Galerkin form).
.. [2] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968, ch. 4.
.. [3] C. A. Balanis, *Antenna Theory: Analysis and Design*, 3rd ed., Wiley,
   2005, sec. 4.8 (ground effects, reflection coefficients). (from memory)
.. [4] E. K. Miller, A. J. Poggio, G. J. Burke and E. S. Selden, "Analysis of
   wire antennas in the presence of a conducting half-space", Can. J. Phys.
   50, 1972 (the reflection-coefficient approximation for wires). (from memory)

Band sweeps, the low-frequency hand-offs and the solves are in
:mod:`aerial.models.fullwave_system`; the far field and the Fresnel
coefficients in :mod:`aerial.models.fullwave_fields`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from aerial.core.constants import SPEED_OF_LIGHT as C0

from aerial.core.errors import ModelInputError
from aerial.models.fullwave_fields import FarField, complex_permittivity, fresnel_reflection
from aerial.models.fullwave_geometry import DEFAULT_MIN_PIECES_PER_WIRE, check_segments, piece_counts
from aerial.models.fullwave_kernel import DEFAULT_GAUSS_POINTS
from aerial.models.fullwave_system import (
    System,
    loop_tree_currents,
    matrix_norm1,
    solve_matrix,
    build_table,
    plan_band,
    quasi_static_currents,
    wire_impedance_per_m,
)
from aerial.models.segments import Segments
from aerial.models.checks import option as _check_option

__all__ = [
    "FullWaveResult",
    "GROUND_MODELS",
    "solve_full_wave",
    "complex_permittivity",
    "fresnel_reflection",
    "wire_impedance_per_m",
]

#: Valid ``ground`` options.
GROUND_MODELS = ("perfect", "lossy", "reflection-coefficient")

#: Longest piece as a fraction of the shortest wavelength (lambda/20). [1]
DEFAULT_MAX_SEGMENT_WAVELENGTHS = 0.05
#: Relative change of Z from N to 2N pieces accepted as converged. [1]
DEFAULT_CONVERGENCE_TOLERANCE = 0.01
#: Truncation bound of the band tables' Taylor series (relative). [1]
DEFAULT_EXPANSION_TOLERANCE = 1e-10
#: Memory allowed for the band tables and the convergence check. [byte]
DEFAULT_MEMORY_LIMIT = 200 * 2**20
#: Relative error of the input resistance (from the condition number) above
#: which the resistance is taken from the power balance instead. [1]
RESISTANCE_RESOLUTION_TOLERANCE = 1e-3
#: Estimated relative error of the currents above which the moment solution
#: is replaced by the quasi-static one. [1]
QUASI_STATIC_HANDOFF = 1e-6
#: Electrical size k * (largest dimension) below which the quasi-static
#: solution is used directly. [1]
QUASI_STATIC_KD = 1e-6
#: ka above which the thin-wire approximation is doubtful. [1]
MAX_KA = 0.05
#: Wire height (in wavelengths) below which the reflection-coefficient
#: approximation is flagged as rough. [1]
RCA_MIN_HEIGHT_WAVELENGTHS = 0.1
#: Relative mismatch between the power-balance and V/I resistances reported as a warning. [1]
POWER_BALANCE_WARNING = 0.02

_EPS = np.finfo(float).eps


@dataclass(frozen=True)
class FullWaveResult:
    """Result of :func:`solve_full_wave` (all arrays indexed by frequency first).

    Attributes
    ----------
    frequency : ndarray, shape (F,)
        Frequencies. [Hz]
    impedance : ndarray of complex, shape (F,)
        Input impedance at the feed, including ``series_resistance``. [ohm]
    feed_current : ndarray of complex, shape (F,)
        Feed current for 1 V at the gap. [A]
    current_position : ndarray, shape (P, 3)
        Piece midpoints where ``current`` is given. [m]
    current_direction : ndarray, shape (P, 3)
        Unit vector of the positive current direction on each piece.
    current : ndarray of complex, shape (F, P)
        Current at each piece midpoint for 1 V at the feed. [A]
    current_ends : ndarray of complex, shape (F, P, 2)
        Current at each piece's start and end for 1 V at the feed. [A]
    current_length : ndarray, shape (P,)
        Length of each piece. [m]
    effective_height : ndarray of complex, shape (F,)
        Vertical current moment divided by the feed current,
        (1/I0) int I(s) s_z ds over the real wires. [m]
    open_circuit_voltage_per_field : ndarray of complex, shape (F,)
        Open-circuit voltage per unit vertical field at the ground (the field
        including its ground reflection), by reciprocity equal to
        ``effective_height``. [V per V/m]
    radiation_resistance : ndarray, shape (F,)
        2 P_rad / |I0|^2 with P_rad from the far field integrated over the
        upper half-space. [ohm]
    conductor_loss_resistance : ndarray, shape (F,)
        Skin-effect loss of the wires referred to the feed current. [ohm]
    electrode_loss_resistance : ndarray, shape (F,)
        Earth-electrode loss (``electrode_ohm`` |I_e/I0|^2). [ohm]
    series_resistance : float
        Ground-system loss added in series (the ``series_ohm`` argument). [ohm]
    ground_loss_resistance : ndarray, shape (F,)
        Lossy ground only: input resistance not accounted for by the space-wave
        radiation and the wire and electrode losses (ground absorption plus
        power leaving along the surface); zero on a perfect ground. [ohm]
    efficiency : ndarray, shape (F,)
        radiation_resistance / Re(impedance). [1]
    capacitance : ndarray, shape (F,)
        -1/(omega X) where the reactance X < 0, else 0. [F]
    capacitive : ndarray of bool, shape (F,)
        Where X < 0 (``capacitance`` is meaningful).
    power_balance_mismatch : ndarray, shape (F,)
        |R_in - (R_rad + R_loss)| / R_in on a perfect ground (the self-check of
        the far-field integration); 0 when the resistance was taken from the
        power balance or the ground is lossy. [1]
    condition_number : ndarray, shape (F,)
        1-norm condition number estimate of the impedance matrix. [1]
    method : tuple of str, length F
        "moment", "moment, loop-tree basis", either with ", resistance from
        power balance", or "quasi-static".
    convergence : float
        |Z(2N) - Z(N)| / |Z(2N)| at ``convergence_frequency`` (the highest
        frequency); N/2 against N when 2N does not fit the memory limit. [1]
    convergence_resistance : float
        The same for the resistance. [1]
    convergence_frequency : float
        Where the check was made (0 when it was skipped). [Hz]
    converged : bool
        ``convergence`` below ``convergence_tolerance``.
    convergence_tolerance : float
        [1]
    n_unknowns, n_pieces : int
        Basis functions and pieces.
    band_method : str
        How the matrices were obtained: direct fill, or the sub-bands and
        orders of the Taylor-series band tables.
    ground : str
        The ground option used.
    model : str
        One line naming the method and the ground treatment.
    warnings : tuple of str
        Everything outside a model's validity range, and hand-offs.
    """

    frequency: np.ndarray
    impedance: np.ndarray
    feed_current: np.ndarray
    current_position: np.ndarray
    current_direction: np.ndarray
    current: np.ndarray
    current_ends: np.ndarray
    effective_height: np.ndarray
    open_circuit_voltage_per_field: np.ndarray
    radiation_resistance: np.ndarray
    conductor_loss_resistance: np.ndarray
    electrode_loss_resistance: np.ndarray
    series_resistance: float
    ground_loss_resistance: np.ndarray
    efficiency: np.ndarray
    capacitance: np.ndarray
    capacitive: np.ndarray
    power_balance_mismatch: np.ndarray
    condition_number: np.ndarray
    method: tuple
    convergence: float
    convergence_resistance: float
    convergence_frequency: float
    converged: bool
    convergence_tolerance: float
    n_unknowns: int
    n_pieces: int
    band_method: str
    ground: str
    model: str
    warnings: tuple = field(default=())
    current_length: np.ndarray = field(default=None)




def solve_full_wave(
    segments: Segments,
    frequency,
    *,
    ground: str = "perfect",
    soil_permittivity: float | None = None,
    soil_conductivity: float | None = None,
    series_ohm: float = 0.0,
    max_segment_wavelengths: float = DEFAULT_MAX_SEGMENT_WAVELENGTHS,
    min_pieces_per_wire: int = DEFAULT_MIN_PIECES_PER_WIRE,
    convergence_check: bool = True,
    convergence_tolerance: float = DEFAULT_CONVERGENCE_TOLERANCE,
    band_expansion: bool = True,
    expansion_tolerance: float = DEFAULT_EXPANSION_TOLERANCE,
    memory_limit: int = DEFAULT_MEMORY_LIMIT,
    gauss_points: int = DEFAULT_GAUSS_POINTS,
    progress=None,
) -> FullWaveResult:
    """Input impedance, currents and effective height of a wire aerial by the method of moments.

    Parameters
    ----------
    segments : Segments
        The aerial and (optionally) the earth lead. Frame: m, z up, ground at z = 0.
    frequency : array_like
        Frequencies, positive. [Hz]
    ground : {"perfect", "lossy", "reflection-coefficient"}
        Perfect ground plane (images), the exact lossy half-space (Sommerfeld
        integrals), or the fast reflection-coefficient approximation.
    soil_permittivity : float, optional
        Relative permittivity of the soil; required over a lossy soil. [1]
    soil_conductivity : float, optional
        Soil conductivity; required over a lossy soil. [S/m]
    series_ohm : float
        Ground-system loss computed elsewhere, added in series to the input
        impedance and to the loss budget. [ohm]
    max_segment_wavelengths : float
        Longest piece as a fraction of the shortest wavelength. [1]
    min_pieces_per_wire : int
        Fewest pieces per user wire at any frequency. [1]
    convergence_check : bool
        Solve again with every piece halved at the highest frequency and
        report the relative change.
    convergence_tolerance : float
        Relative change of the impedance accepted as converged. [1]
    band_expansion : bool
        Expand the impedance matrix in a Taylor series in k across the band
        when it pays (perfect ground, four or more frequencies, memory
        permitting), checked against a direct fill at each sub-band edge.
    expansion_tolerance : float
        Truncation bound of the Taylor series, relative. [1]
    memory_limit : int
        Memory the band tables and the convergence check may use. [byte]
    gauss_points : int
        Gauss-Legendre points per piece in the matrix fill. [1]
    progress : callable, optional
        Called as ``progress(done, total)`` after each frequency.

    Returns
    -------
    FullWaveResult

    Notes
    -----
    Galerkin mixed-potential EFIE ([1]_ of the module)::

        sum_n Z_mn I_n = V_m,  Z_mn = j k eta A_mn + eta/(j k) Phi_mn + Z^loss_mn,

    V_m = 1 V on the basis function that crosses the feed gap. The input
    impedance is Z = 1/I0 + ``series_ohm``; the effective height
    h_e = (1/I0) int I(s) s_z ds; the radiation resistance 2 P_rad/|I0|^2 from
    the far field over the upper half-space; the capacitance -1/(omega X).

    Low frequencies: where the condition number says the small real part of
    V/I is not resolved, the resistance is taken from the power balance
    (radiated power from the far field plus the wire and electrode losses),
    which stays accurate; where even the currents are not resolved (or the
    aerial is electrically tiny) the quasi-static solution of the same
    discretisation is used (C and h_e from the k -> 0 charge problem,
    R_rad = 160 pi^2 (h_e/lambda)^2), or, for wires forming a loop, the
    loop-tree basis. Every hand-off is reported in ``warnings`` and ``method``.

    Band sweeps on a perfect ground use Taylor-series tables of the matrix in
    k (:mod:`aerial.models.fullwave_system`); ``band_method`` says how.

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> seg = polyline_segments([[0, 0, 0.02], [0, 0, 10.02]], 1e-3)   # 10 m vertical, 2 cm gap
    >>> r = solve_full_wave(seg, [100e3], convergence_check=False)
    >>> round(float(r.capacitance[0]) * 1e12, 1), round(float(r.effective_height[0].real), 2)
    (68.6, 4.85)

    References
    ----------
    See the module docstring.
    """
    f, eps_s, sig_s = _checked_arguments(
        segments, frequency, ground, soil_permittivity, soil_conductivity, series_ohm, max_segment_wavelengths,
        convergence_tolerance, expansion_tolerance, min_pieces_per_wire, gauss_points)
    lam_min = C0 / f.max()
    counts = piece_counts(segments, max_segment_wavelengths * lam_min, min_pieces_per_wire)
    system = System(segments, counts, ground, eps_s, sig_s, gauss_points)
    warnings = _setup_warnings(system, f, max_segment_wavelengths)
    sweep = _Sweep(system, f, series_ohm, warnings)
    sweep.run(band_expansion, expansion_tolerance, memory_limit, progress)
    sweep.summarise()

    # ---------- convergence: N against 2N at the highest frequency
    conv = conv_r = 0.0
    f_conv = 0.0
    if convergence_check:
        conv, conv_r, f_conv, note = _convergence(system, segments, counts, f, sweep.i_feed, sweep.z_in, series_ohm,
                                                  sweep.v, gauss_points, memory_limit)
        if note:
            warnings.append(note)
    converged = (not convergence_check) or conv <= convergence_tolerance
    if convergence_check and not converged:
        warnings.append(
            f"not converged: the impedance changes by {conv:.3g} (relative) when every piece is halved "
            f"at {f_conv:.6g} Hz (tolerance {convergence_tolerance:g})"
        )
    result = sweep.result(float(conv), float(conv_r), float(f_conv), bool(converged), float(convergence_tolerance))
    _assert_finite(result)
    return result


def _checked_arguments(segments, frequency, ground, soil_permittivity, soil_conductivity, series_ohm,
                       max_segment_wavelengths, convergence_tolerance, expansion_tolerance, min_pieces_per_wire,
                       gauss_points):
    """Frequencies [Hz] as a 1-D array and the soil's (eps_r, sigma) or (None, None); raise ModelInputError."""
    _check_option("ground", ground, GROUND_MODELS)
    f = np.atleast_1d(np.asarray(frequency, dtype=float))
    if f.ndim != 1 or f.size == 0 or not np.all(np.isfinite(f)) or np.any(f <= 0):
        raise ModelInputError(f"frequency must be a non-empty 1-D array of positive finite values [Hz], got {frequency!r}")
    for name, val, lo in (("max_segment_wavelengths", max_segment_wavelengths, 0.0),
                          ("convergence_tolerance", convergence_tolerance, 0.0),
                          ("expansion_tolerance", expansion_tolerance, 0.0)):
        if not (np.isfinite(val) and val > lo):
            raise ModelInputError(f"{name} must be positive and finite, got {val!r}")
    if max_segment_wavelengths > 0.25:
        raise ModelInputError(f"max_segment_wavelengths must be at most 0.25, got {max_segment_wavelengths!r}")
    if not (np.isfinite(series_ohm) and series_ohm >= 0):
        raise ModelInputError(f"series_ohm must be >= 0 [ohm], got {series_ohm!r}")
    if int(min_pieces_per_wire) < 1 or int(gauss_points) < 2:
        raise ModelInputError("min_pieces_per_wire must be >= 1 and gauss_points >= 2")
    eps_s = sig_s = None
    if ground != "perfect":
        if soil_permittivity is None or soil_conductivity is None:
            raise ModelInputError(f"ground='{ground}' needs soil_permittivity [1] and soil_conductivity [S/m]")
        eps_s, sig_s = float(soil_permittivity), float(soil_conductivity)
        if not (np.isfinite(eps_s) and eps_s >= 1.0) or not (np.isfinite(sig_s) and sig_s >= 0.0):
            raise ModelInputError("soil_permittivity must be >= 1 and soil_conductivity >= 0 and finite")
    check_segments(segments)
    return f, eps_s, sig_s


def _setup_warnings(system, f, max_segment_wavelengths) -> list:
    """Warnings that depend on the discretisation only (thin-wire limits, ground treatment)."""
    topo = system.topo
    warnings = list(topo.warnings)
    lam_min = C0 / f.max()
    if np.max(topo.length) > max_segment_wavelengths * lam_min * 1.0001:
        warnings.append("some pieces are longer than the requested fraction of a wavelength")
    ka = 2 * np.pi * f.max() / C0 * topo.radius.max()
    if ka > MAX_KA:
        warnings.append(f"wire radius is {ka:.3g}/k at the highest frequency: thin-wire approximation doubtful (ka > {MAX_KA:g})")
    if system.ground == "reflection-coefficient":
        hmax = max(topo.start[:, 2].max(), topo.end[:, 2].max())
        if hmax < RCA_MIN_HEIGHT_WAVELENGTHS * lam_min:
            warnings.append(
                f"lossy ground: the reflection-coefficient approximation is rough for wires below "
                f"{RCA_MIN_HEIGHT_WAVELENGTHS:g} wavelength (highest point {hmax / lam_min:.3g} wavelength); "
                "its resistance is an indication only"
            )
    return warnings


class _Sweep:
    """The frequency loop of :func:`solve_full_wave`: per-frequency solves and the figures drawn from them."""

    def __init__(self, system, f, series_ohm, warnings):
        self.system, self.f, self.series_ohm, self.warnings = system, f, series_ohm, warnings
        topo = system.topo
        F, P = f.size, topo.n_pieces
        self.k_all = 2 * np.pi * f / C0
        self.z_in = np.zeros(F, complex)
        self.i_feed = np.zeros(F, complex)
        self.cur_ends = np.zeros((F, P, 2), complex)
        self.h_eff = np.zeros(F, complex)
        self.r_rad = np.zeros(F)
        self.r_cond = np.zeros(F)
        self.r_elec = np.zeros(F)
        self.r_gnd = np.zeros(F)
        self.mismatch = np.zeros(F)
        self.cond = np.zeros(F)
        self.method = [""] * F
        self.v = topo.feed_weight.astype(complex)
        self.hand_pb, self.hand_qs, self.hand_lt, self.rca_unphysical = [], [], [], []
        self.unresolved, self.non_finite = [], []
        self.used_tables = []
        self.far = FarField(topo.start, topo.end, topo.parent, self.k_all.max())

    def run(self, band_expansion, expansion_tolerance, memory_limit, progress):
        """Solve at every frequency (in increasing order), building band tables as the sweep reaches them."""
        system, f = self.system, self.f
        order = np.argsort(f)
        plan = []
        if band_expansion and system.ground == "perfect":
            plan, notes = plan_band(system, self.k_all[order], expansion_tolerance, memory_limit)
            self.warnings.extend(notes)
        self._table, self._table_band = None, None
        zi_all = system.piece_impedance(f)  # (P, F) wire impedance per metre
        loss_all = system.loss_entries(zi_all)
        cur = np.zeros((f.size, system.topo.n_unknowns), dtype=complex)
        for done, i in enumerate(order, start=1):
            cur[i] = self._currents(i, plan, zi_all[:, i], loss_all[:, i])
            if progress is not None:
                progress(done, f.size)
        self._figures(cur, zi_all)

    def _matrix(self, k, plan, loss_entries):
        """Impedance matrix with losses at k, from the band table where one covers k.

        Returns the matrix and the table's row-block edges when it comes from a table (only its upper row
        blocks are then written: :meth:`SeriesTable.matrix`), else None.
        """
        system = self.system
        band = next((p for p in plan if p[0] <= k <= p[1]), None)
        if band is not None and band is not self._table_band:
            self._table, self._table_band = None, band  # drop the previous table before building the next
            self._table, note = build_table(system, *band)
            if note:
                self.warnings.append(note)
            if self._table is not None:
                self.used_tables.append((band[0], band[1], self._table.order))
        if band is not None and self._table is not None:
            z, blocks = self._table.matrix(k), self._table.edges
        else:
            z, blocks = system.matrix_direct(k), None
        system.add_losses(z, entries=loss_entries)
        return z, blocks

    def _currents(self, i, plan, zi, loss_entries):
        """Basis-function currents at frequency i for 1 V at the feed, with the low-frequency hand-offs."""
        system, fi, k = self.system, self.f[i], self.k_all[i]
        cur = None
        qs = k * system.size < QUASI_STATIC_KD
        if not qs:
            z, blocks = self._matrix(k, plan, loss_entries)
            anorm = matrix_norm1(z, blocks)  # not finite when an entry is not
            if not np.isfinite(anorm):
                qs = True
                self.non_finite.append(fi)
            else:
                cur, cnd = solve_matrix(z, self.v, system.symmetric, anorm)
                self.cond[i] = cnd
                delta = 10 * _EPS * cnd
                if not np.all(np.isfinite(cur)) or delta > QUASI_STATIC_HANDOFF:
                    qs = True
        if qs and system.loop_tree()[1] > 0:
            # loops (possibly through the ground): the charge-only limit is wrong, use loop-tree
            cur, self.cond[i] = loop_tree_currents(system, k, self.v, system.loss_matrix(zi))
            self.hand_lt.append(fi)
            self.method[i] = "moment, loop-tree basis"
        elif qs:
            cur, self.cond[i] = quasi_static_currents(system, k, self.v)
            self.method[i] = "quasi-static"
            self.hand_qs.append(fi)
        return cur

    def _figures(self, cur, zi):
        """Feed current, effective height, loss and radiation resistances and the input impedance at every frequency.

        ``cur`` (F, N): basis currents for 1 V at the feed; ``zi`` (P, F): wire impedance per metre.
        """
        system, f, k = self.system, self.f, self.k_all
        topo = system.topo
        t0, t1 = topo.t_end
        ie = np.stack([(t0 @ cur.T).T, (t1 @ cur.T).T], axis=-1)  # (F, P, 2)
        i0 = cur @ self.v
        self.cur_ends[:] = ie
        self.i_feed[:] = i0
        # effective height: vertical current moment over the real wires
        self.h_eff[:] = np.sum(topo.tangent[:, 2] * topo.length * 0.5 * (ie[..., 0] + ie[..., 1]), axis=1) / i0
        # losses
        pc = 0.5 * np.sum(zi.real.T * topo.length * (np.abs(ie[..., 0]) ** 2 + np.abs(ie[..., 1]) ** 2
                                                     + (ie[..., 0] * np.conj(ie[..., 1])).real) / 3.0, axis=1)
        pe = 0.5 * np.sum(topo.electrode * np.abs(cur) ** 2, axis=1)
        i0sq = np.abs(i0) ** 2
        self.r_cond[:], self.r_elec[:] = 2 * pc / i0sq, 2 * pe / i0sq
        qs = np.array([m == "quasi-static" for m in self.method], dtype=bool)
        lam = 2 * np.pi / k
        self.r_rad[qs] = 160 * np.pi**2 * np.abs(self.h_eff[qs] / lam[qs]) ** 2
        if np.any(~qs):
            refl = None
            if system.ground != "perfect":
                refl = np.asarray(complex_permittivity(f[~qs], system.eps_soil, system.sigma_soil), dtype=complex)
            self.r_rad[~qs] = 2 * self.far.power_many(k[~qs], ie[~qs], refl) / i0sq[~qs]
        for i in range(f.size):
            r_pb = self.r_rad[i] + self.r_cond[i] + self.r_elec[i]
            zvi = 1.0 / i0[i]
            if qs[i]:
                zvi = complex(r_pb, zvi.imag)
            else:
                zvi = self._resolved_resistance(i, zvi, r_pb)
            self.z_in[i] = zvi + self.series_ohm

    def _resolved_resistance(self, i, zvi, r_pb):
        """V/I, or its resistance from the power balance where the solution does not resolve it."""
        fi, ground = self.f[i], self.system.ground
        res_err = 10 * _EPS * self.cond[i] * abs(zvi)
        if ground == "perfect" and res_err > RESISTANCE_RESOLUTION_TOLERANCE * r_pb:
            zvi = complex(r_pb, zvi.imag)
            self.method[i] = (self.method[i] or "moment") + ", resistance from power balance"
            self.hand_pb.append(fi)
        else:
            self.method[i] = self.method[i] or "moment"
            if ground == "perfect":
                self.mismatch[i] = abs(zvi.real - r_pb) / max(abs(zvi.real), 1e-300)
            elif res_err > RESISTANCE_RESOLUTION_TOLERANCE * max(zvi.real, 1e-300):
                self.unresolved.append((fi, res_err))
        if ground != "perfect":
            self.r_gnd[i] = max(zvi.real - r_pb, 0.0)
            if zvi.real < 0.99 * r_pb:
                self.rca_unphysical.append(fi)
        return zvi

    def summarise(self):
        """One warning per hand-off or doubtful condition, naming the frequencies where it holds."""
        warnings = self.warnings
        if self.hand_pb:
            warnings.append(
                "low-frequency limit: at " + _freq_list(self.hand_pb) + " the input resistance is below what the "
                "matrix solution resolves; it is taken from the power balance (far-field radiation plus wire and "
                "electrode losses)"
            )
        if self.hand_lt:
            warnings.append(
                "low-frequency breakdown: at " + _freq_list(self.hand_lt) + " the wires form a loop and the plain "
                "solution is not resolved; solved in the loop-tree basis instead"
            )
        if self.hand_qs:
            warnings.append(
                "low-frequency breakdown: at " + _freq_list(self.hand_qs) + " the full-wave solution is not resolved; "
                "the quasi-static solution (capacitance, effective height, 160 pi^2 (h_e/lambda)^2) is used"
            )
        if self.rca_unphysical:
            how = ("the reflection-coefficient approximation gives" if self.system.ground != "lossy"
                   else "the solution gives")
            warnings.append(
                "lossy ground: at " + _freq_list(self.rca_unphysical) + f" {how} an input resistance below the "
                "space-wave radiation plus wire losses (not physical); "
                + ("use the exact half-space (ground='lossy') instead" if self.system.ground != "lossy"
                   else "the ground loss there is set to zero")
            )
        if self.non_finite:
            warnings.append("non-finite matrix at " + _freq_list(self.non_finite) + ": quasi-static solution used")
        if self.unresolved:
            worst = max(e for _, e in self.unresolved)
            warnings.append(
                "lossy ground: at " + _freq_list([fi for fi, _ in self.unresolved]) + " the input resistance is not "
                f"resolved by the solution (estimated error up to {worst:.3g} ohm)"
            )
        bad_pb = self.mismatch > POWER_BALANCE_WARNING
        if np.any(bad_pb):
            warnings.append(
                f"power balance: far-field radiated power and V/I resistance differ by up to {self.mismatch.max():.3g} "
                f"(at {_freq_list(self.f[bad_pb])})"
            )

    def result(self, conv, conv_r, f_conv, converged, tolerance) -> FullWaveResult:
        """The sweep's figures as a :class:`FullWaveResult`."""
        f, z_in, topo = self.f, self.z_in, self.system.topo
        ground, eps_s, sig_s = self.system.ground, self.system.eps_soil, self.system.sigma_soil
        x = z_in.imag
        capacitive = x < 0
        with np.errstate(divide="ignore"):
            cap = np.where(capacitive, -1.0 / (2 * np.pi * f * np.where(capacitive, x, -1.0)), 0.0)
        r_total = z_in.real
        eff = np.where(r_total > 0, self.r_rad / np.where(r_total > 0, r_total, 1.0), 0.0)
        cur_mid = 0.5 * (self.cur_ends[:, :, 0] + self.cur_ends[:, :, 1])
        if ground == "perfect":
            gname = "perfect ground (images)"
        elif ground == "lossy":
            gname = f"lossy ground, exact half-space by Sommerfeld integrals (eps_r {eps_s:g}, sigma {sig_s:g} S/m)"
        else:
            gname = f"lossy ground by the reflection-coefficient approximation (eps_r {eps_s:g}, sigma {sig_s:g} S/m)"
        model = ("full wave: method of moments, mixed-potential EFIE with triangle basis and Galerkin testing, "
                 f"thin-wire reduced kernel, {gname}")
        band_method = "direct fill at every frequency" if not self.used_tables else "Taylor series in k: " + "; ".join(
            f"{a * C0 / 2 / np.pi / 1e6:.6g}-{b * C0 / 2 / np.pi / 1e6:.6g} MHz order {o}"
            for a, b, o in self.used_tables)
        return FullWaveResult(
            frequency=f, impedance=z_in, feed_current=self.i_feed, current_position=topo.midpoint, current_length=topo.length,
            current_direction=topo.tangent, current=cur_mid, current_ends=self.cur_ends,
            effective_height=self.h_eff, open_circuit_voltage_per_field=self.h_eff.copy(),
            radiation_resistance=self.r_rad, conductor_loss_resistance=self.r_cond,
            electrode_loss_resistance=self.r_elec, series_resistance=float(self.series_ohm),
            ground_loss_resistance=self.r_gnd, efficiency=eff, capacitance=cap, capacitive=capacitive,
            power_balance_mismatch=self.mismatch, condition_number=self.cond, method=tuple(self.method),
            convergence=conv, convergence_resistance=conv_r, convergence_frequency=f_conv, converged=converged,
            convergence_tolerance=tolerance, n_unknowns=topo.n_unknowns, n_pieces=topo.n_pieces,
            band_method=band_method, ground=ground, model=model, warnings=tuple(dict.fromkeys(self.warnings)),
        )


def _freq_list(fs):
    fs = sorted(float(x) for x in fs)
    if len(fs) <= 3:
        return ", ".join(f"{x:.6g} Hz" for x in fs)
    return f"{len(fs)} frequencies from {fs[0]:.6g} to {fs[-1]:.6g} Hz"


def _convergence(system, segments, counts, f, i_feed, z_in, series_ohm, v, n_gauss, memory_limit):
    """Relative change of Z at the highest frequency when every piece is halved (or doubled)."""
    i = int(np.argmax(f))
    k = 2 * np.pi * f[i] / C0
    N = system.topo.n_unknowns
    note = ""
    if (2 * N) ** 2 * 16 * 3 <= memory_limit:
        other = System(segments, counts * 2, system.ground, system.eps_soil, system.sigma_soil, n_gauss)
        fine_is_other = True
    else:
        half = np.maximum(counts // 2, 1)
        other = System(segments, half, system.ground, system.eps_soil, system.sigma_soil, n_gauss)
        fine_is_other = False
        note = f"convergence checked with half the pieces (N/2 against N): 2N = {2 * N} unknowns exceeds the memory limit"
    z = other.matrix_direct(k)
    other.add_losses(z, other.piece_impedance(f[i]))
    cur, _ = solve_matrix(z, other.topo.feed_weight.astype(complex), other.symmetric)
    z_other = 1.0 / (other.topo.feed_weight @ cur) + series_ohm
    z_this = 1.0 / i_feed[i] + series_ohm
    fine, coarse = (z_other, z_this) if fine_is_other else (z_this, z_other)
    conv = abs(fine - coarse) / abs(fine)
    conv_r = abs(fine.real - coarse.real) / max(abs(fine.real), 1e-300)
    return conv, conv_r, f[i], note


def _assert_finite(result: FullWaveResult):
    for name in ("impedance", "feed_current", "current", "effective_height", "radiation_resistance",
                 "conductor_loss_resistance", "electrode_loss_resistance", "efficiency", "capacitance"):
        arr = getattr(result, name)
        if not np.all(np.isfinite(arr)):
            raise FloatingPointError(f"full-wave solver produced a non-finite {name}: please report this")
