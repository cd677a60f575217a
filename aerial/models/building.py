"""A building beside the wire, as a grounded conductor: field shielding and facade images.

A reinforced-concrete or steel-framed building is, at medium and long wave,
a grounded conductor a few metres (often less) from a balcony or eave wire.
Two published pieces describe it in closed form:

* the **field**: the vertical field of a ground wave near the building, in
  the quasi-static limit (the building is small against the wavelength): the
  building is a grounded box (footprint times height) on the grounded plane
  in a uniform vertical field, solved by the method of moments for
  electrostatics (:func:`box_screen`); the potential of the incident field,
  in metres of open-ground height, is z plus that of the box's charges and
  their images. Its check is the two-dimensional conformal map
  w -> sqrt(w^2 + H^2) of an infinitely long wall of height H, which turns
  the ground with the wall into a flat ground: ``Im sqrt((d + i z)^2 + H^2)``
  at a distance d in front of the wall and a height z
  (:func:`facade_field_height`), the box's value at the middle of a very long
  thin block; far from the wall it is z, close to a tall wall d z / H (the
  image solution of ground plus wall). A building of finite width lets the
  field in round its sides as well, which the box has and the wall not;
* the **capacitance**: the wire's charges with their images in the ground
  and in the facade plane (and the image of the image: exact for two
  perpendicular planes), by :func:`aerial.models.capacitance.electrostatic_solution`.

By Green's reciprocity the open-circuit voltage per volt per metre of the
undisturbed field is sum(q phi) / Q over the wire's charges, phi being the
field height above (:func:`facade_static_figures`).

The building's own currents: a grounded conducting building is a fat
receiving monopole short-circuited at its base. Its induced charge, which
sets the field at its surface and so what a wire beside it picks up, grows
with frequency relative to the static charge by
F(z) = [sin kz / kz] cos(delta) / cos(kH + delta) (:func:`induced_charge_factor`,
the transmission-line model of the shorted monopole top-loaded by its roof,
:func:`roof_loading_length`); the screened field is scaled by it near the
building, not far from it (:func:`dynamic_field_height`).

What the building is made of decides how much of that it does: a timber
house hardly shields at all, a steel frame is close to a perfect plane. The
``SHIELDING_BY_CONSTRUCTION`` fraction s blends the two limits::

    h_e = (1 - s) h_e,open + s h_e,facade        C = (1 - s) C_open + s C_facade

with a low and a high s for every construction, carried into the report's
ranges. The fractions are engineering judgement (common practice, from
memory), not measurements: a bench measurement of the aerial settles it.

Frame: metres, x east, y north, z up; ground z = 0; footprint corners in plan.

References
----------
.. [1] W. R. Smythe, *Static and Dynamic Electricity*, 3rd ed., McGraw-Hill,
   1968, ch. 4 (conformal transformation; the grounded plane with a
   perpendicular conducting strip). (from memory)
.. [2] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., Wiley, 1999,
   sec. 2.1-2.2 (method of images; two perpendicular grounded planes, three
   images) and problem 1.12 (Green's reciprocation theorem). (from memory)
.. [3] S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*,
   Wiley, 1952 (the antenna as a transmission line; average characteristic
   impedance 60 [ln(2h/a) - 1]). (from memory)
.. [4] R. W. P. King, *The Theory of Linear Antennas*, Harvard University
   Press, 1956 (the receiving antenna: induced current of a short-circuited
   monopole in a uniform field). (from memory)
.. [5] E. A. Laport, *Radio Antenna Engineering*, McGraw-Hill, 1952, ch. 1
   (top-loading angle, tan delta = omega C_top Z0). (from memory)
.. [6] H. A. Wheeler, "The radiansphere around a small antenna", Proc. IRE
   47(8), 1325-1331, 1959 (the radian length lambda / 2 pi). (from memory)
.. [7] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
   1968, ch. 2 (electrostatic moment solutions of charged plates and boxes).
   (from memory)
"""

from __future__ import annotations

import numpy as np

from aerial.core.arrays import scratch_planes, sorted_unique
from aerial.core.constants import EPSILON_0, SPEED_OF_LIGHT
from aerial.core.errors import ModelInputError
from aerial.core.lengthtext import metres, words
from aerial.core.records import NamedTuple
from aerial.models.capacitance import electrostatic_solution
from aerial.models.short_aerial import monopole_z0_schelkunoff
from aerial.models.segments import Segments

#: Shielding fraction s (low, nominal, high) by construction: 0 is open ground, 1 a perfect plane.
#: Engineering judgement (common practice, from memory): reinforcing-bar mesh and steel frames
#: are good conductors at MF/LF, masonry with its wiring and pipes a partial one, timber hardly one.
SHIELDING_BY_CONSTRUCTION = {
    "steel frame": (0.9, 1.0, 1.0),
    "reinforced concrete": (0.7, 0.9, 1.0),
    "masonry": (0.1, 0.35, 0.6),
    "timber frame": (0.0, 0.05, 0.2),
    "unknown": (0.0, 0.9, 1.0),
}
#: Unknowns of the facade-image solution: its four-fold fill costs what 480 open-ground unknowns do at 240;
#: on the examples its figures change by less than 0.1 % from 240 (consistency check, docs/models-building.md). [1]
FACADE_TARGET_UNKNOWNS = 120
#: Pieces of wire this far or less in front of the facade plane are cut off as lying in it. [m]
WALL_CLEARANCE_M = 0.02
#: The building's own currents are taken in (:func:`induced_charge_factor`) while its electrical height k h_e
#: = k H + delta stays within one radian (h_e within the radiansphere, lambda / 2 pi); past it, nearing the first
#: resonance (k h_e = pi/2), the line model's 1/cos(k h_e) outruns the full-wave grid (docs/models-building.md)
#: and the figures are held at their value at the limit and flagged. [rad]
MAX_ELECTRICAL_HEIGHT_RAD = 1.0


class BuildingBody:
    """A building as the models see it.

    Attributes
    ----------
    footprint : ndarray, shape (K, 2)
        Plan corners in order around the edge. [m]
    height_m : float
        Roof height above the ground. [m]
    construction : str
        A key of ``SHIELDING_BY_CONSTRUCTION``.
    """

    __slots__ = ("footprint", "height_m", "construction")

    def __init__(self, footprint, height_m: float, construction: str):
        fp = np.asarray(footprint, dtype=float)
        if fp.ndim != 2 or fp.shape[1] != 2 or len(fp) < 3:
            raise ModelInputError("a building footprint needs at least three plan corners [[x, y], ...]")
        if not height_m > 0:
            raise ModelInputError(f"a building height must be positive; got {height_m!r}")
        if construction not in SHIELDING_BY_CONSTRUCTION:
            raise ModelInputError(f"{construction!r} is not a known construction, must be one of "
                                  + ", ".join(repr(k) for k in SHIELDING_BY_CONSTRUCTION))
        for name, value in (("footprint", fp), ("height_m", height_m), ("construction", construction)):
            object.__setattr__(self, name, value)  # set once, here: a BuildingBody is read-only afterwards

    def __setattr__(self, name, value):
        raise AttributeError(f"BuildingBody is read-only: cannot set {name!r} (make a new BuildingBody)")

    def __delattr__(self, name):
        raise AttributeError(f"BuildingBody is read-only: cannot delete {name!r}")

    def __repr__(self) -> str:
        return (f"BuildingBody(footprint={self.footprint.tolist()!r}, height_m={self.height_m!r}, "
                f"construction={self.construction!r})")

    @property
    def shielding(self) -> tuple:
        """(low, nominal, high) shielding fraction of its construction. [1]"""
        return SHIELDING_BY_CONSTRUCTION[self.construction]


def facade_field_height(distance, height, wall_height):
    """Open-ground height equivalent to the field in front of a grounded wall (quasi-static).

    Parameters
    ----------
    distance : array_like
        Horizontal distance in front of the wall (0 on or inside it). [m]
    height : array_like
        Height above the ground. [m]
    wall_height : array_like
        Height of the wall (the building's roof). [m]

    Returns
    -------
    ndarray
        phi / E0: the potential of the incident vertical field relative to
        the grounded building, in metres (z for open ground). [m]

    Notes
    -----
    Two-dimensional Laplace problem: the ground z = 0 and the wall
    {x = 0, 0 <= z <= H} grounded, a uniform field E0 far away. The map
    zeta = sqrt(w^2 + H^2), w = x + i z, sends the region onto the upper
    half-plane with the conductors on its edge, so phi = E0 Im zeta [1].
    Limits: x >> H gives z; H >> x, z gives x z / H, the potential between
    two perpendicular grounded planes (images). A building of finite width
    lets the field in round its sides too, so the 2-D value is the shielded
    end; valid while H is well below lambda / (2 pi). The report takes the
    grounded box of :func:`box_screen`; this map is its check (the middle of
    a very long, thin block).

    References
    ----------
    .. [1] W. R. Smythe, *Static and Dynamic Electricity*, 3rd ed., 1968,
       ch. 4. (from memory)

    Examples
    --------
    >>> round(float(facade_field_height(1e4, 10.0, 18.0)), 3)
    10.0
    >>> round(float(facade_field_height(0.0, 10.0, 18.0)), 3)
    0.0
    """
    d = np.maximum(np.asarray(distance, dtype=float), 0.0)
    z = np.maximum(np.asarray(height, dtype=float), 0.0)
    h = np.asarray(wall_height, dtype=float)
    w = d + 1j * z
    return np.imag(np.sqrt(w * w + h * h + 0j))


def footprint_area(footprint):
    """Plan area of a polygon (shoelace formula). [m^2]

    Parameters
    ----------
    footprint : array_like, shape (K, 2)
        Plan corners in order around the edge. [m]

    References
    ----------
    The shoelace (surveyor's) formula, A = |sum (x_i y_(i+1) - x_(i+1) y_i)| / 2; e.g. M. Abramowitz and
    I. A. Stegun, *Handbook of Mathematical Functions*, 1964, 25.2 area of a polygon. (from memory)

    Examples
    --------
    >>> float(footprint_area([[0, 0], [24, 0], [24, 12], [0, 12]]))
    288.0
    """
    a = np.asarray(footprint, dtype=float)
    b = np.roll(a, -1, axis=0)
    return abs(0.5 * float(np.sum(a[:, 0] * b[:, 1] - b[:, 0] * a[:, 1])))


def roof_equivalent_radius(footprint):
    """Radius of the disc with the roof's area, sqrt(A / pi): the building's equivalent radius. [m]

    Parameters
    ----------
    footprint : array_like, shape (K, 2)
        Plan corners in order around the edge. [m]

    References
    ----------
    The equal-area disc as the roof's stand-in for its capacitance 8 eps0 a (module references [2], Jackson
    sec. 3.13) and the line's radius in Z0 = 60 [ln(2H/a) - 1] ([3], Schelkunoff & Friis). (from memory)

    Examples
    --------
    >>> round(roof_equivalent_radius([[0, 0], [24, 0], [24, 12], [0, 12]]), 3)
    9.575
    """
    return float(np.sqrt(footprint_area(footprint) / np.pi))


def roof_loading_length(height, radius):
    """Static end correction of a building's roof: the length of wall line that holds the roof's charge. [m]

    Parameters
    ----------
    height : float
        Roof height H. [m]
    radius : float
        Equivalent radius of the building (:func:`roof_equivalent_radius`). [m]

    Returns
    -------
    float
        Delta h = c C_roof Z0, so that the top-loading angle is
        delta = arctan(k Delta h). [m]

    Notes
    -----
    The walls are a vertical line of average characteristic impedance
    Z0 = 60 [ln(2H/a) - 1] (Schelkunoff's form [1]); the roof a flat disc
    of radius a, C_roof = 8 eps0 a (the conducting disc, both faces [2]),
    loading its top end: tan delta = omega C_roof Z0 = k c C_roof Z0 [3].
    For a squat building (2H/a < e) the thin-line Z0 reaches zero and is
    held there: the roof then adds nothing and the correction is the bare
    line's, small at MF for such a building (k H < 0.4 up to 1.71 MHz for a
    10 m block).

    References
    ----------
    .. [1] Schelkunoff and Friis, 1952 (module reference [3]). (from memory)
    .. [2] J. D. Jackson, *Classical Electrodynamics*, 3rd ed., 1999, sec. 3.13
       (the charged conducting disc, C = 8 eps0 a). (from memory)
    .. [3] Laport, 1952, ch. 1 (module reference [5]). (from memory)

    Examples
    --------
    >>> round(roof_loading_length(21.0, 9.575), 3)
    5.834
    """
    z0 = max(float(monopole_z0_schelkunoff(height, radius)), 0.0)
    return SPEED_OF_LIGHT * 8.0 * EPSILON_0 * float(radius) * z0


def induced_charge_factor(height, frequency, building_height, loading_length):
    """Induced charge on a grounded building at a height, relative to its static value, per frequency.

    Parameters
    ----------
    height : array_like
        Height on the building (held to its roof). [m]
    frequency : array_like
        Frequencies (broadcast against ``height``). [Hz]
    building_height : float
        Roof height H. [m]
    loading_length : float
        The roof's static end correction Delta h (:func:`roof_loading_length`); 0 for a bare line. [m]

    Returns
    -------
    ndarray
        F = [sin kz / kz] cos(delta) / cos(kH + delta), delta = arctan(k Delta h). [1]

    Notes
    -----
    The building as a transmission line (its walls against the ground) of
    height H, short-circuited at its base and loaded at its top by its roof
    (angle delta), in a uniform incident vertical field E0 [1], [2]: with V
    the line voltage (charge per metre over C'), dV/dz = E0 - j omega L' I,
    dI/dz = -j omega C' V, V(0) = 0 and I(H) = j omega C_roof V(H) give::

        V(z) = E0 cos(delta) sin(kz) / [k cos(kH + delta)]

    whose static limit is E0 z. The charge, and with it the field at the
    building's surface, is F = V / (E0 z) times its static value: 1 as
    k -> 0 (1 + O((kH)^2)), rising towards the first resonance
    kH + delta = pi/2, where the lossless line has no bound: callers hold
    the frequency below :func:`building_limit_frequency`. Inputs at or past
    the resonance give a large finite number, never an infinity.

    References
    ----------
    .. [1] King, 1956 (module reference [4]). (from memory)
    .. [2] Schelkunoff and Friis, 1952 (module reference [3]). (from memory)

    Examples
    --------
    >>> round(float(induced_charge_factor(12.6, 1e3, 21.0, 0.0)), 6)
    1.0
    >>> round(float(induced_charge_factor(21.0, 1.71e6, 21.0, 0.0)), 4)
    1.2443
    """
    k, sinc = _height_sinc(height, frequency, building_height)
    return _loaded_line(k, sinc, building_height, loading_length)


def _height_sinc(height, frequency, building_height):
    """The wavenumber k [1/m] and sin(kz) / kz [1] of :func:`induced_charge_factor`, z held to the roof: the
    part of F that does not depend on the roof's loading."""
    z = np.minimum(np.maximum(np.asarray(height, dtype=float), 0.0), float(building_height))
    k = 2 * np.pi * np.asarray(frequency, dtype=float) / SPEED_OF_LIGHT
    kz = k * z
    small = kz < 1e-6
    return k, np.where(small, 1.0 - kz * kz / 6.0, np.sin(kz) / np.where(small, 1.0, kz))


def _loaded_line(k, sinc, building_height, loading_length):
    """:func:`induced_charge_factor` from its :func:`_height_sinc` for a roof loading length [m]. [1]"""
    delta = np.arctan(k * float(loading_length))
    return sinc * np.cos(delta) / np.maximum(np.cos(k * float(building_height) + delta), 1e-6)


def building_limit_frequency(height, loading_length):
    """Frequency where the building's electrical height k H + delta reaches ``MAX_ELECTRICAL_HEIGHT_RAD``. [Hz]

    Notes
    -----
    Solves u H + arctan(u Delta h) = 1 rad for u = k by Newton's method
    (the left side rises and bends down, so from u = 1 / (H + Delta h) the
    iterates climb to the root), f = u c / 2 pi.

    Parameters
    ----------
    height : float
        Roof height. [m]
    loading_length : float
        The roof's end correction Delta h (:func:`roof_loading_length`). [m]

    References
    ----------
    The one-radian limit is Wheeler's radian length lambda / 2 pi (module reference [6]); the top-loaded
    line's electrical height k H + delta with tan delta = k Delta h, Laport ([5]). (from memory)

    Examples
    --------
    >>> round(building_limit_frequency(21.0, 5.834) / 1e6, 3)
    1.784
    """
    h, dh = float(height), float(loading_length)
    u = MAX_ELECTRICAL_HEIGHT_RAD / (h + dh)
    for _ in range(40):
        g = u * h + np.arctan(u * dh) - MAX_ELECTRICAL_HEIGHT_RAD
        step = g / (h + dh / (1.0 + (u * dh) ** 2))
        u -= step
        if abs(step) < 1e-12 * u:
            break
    return float(u * SPEED_OF_LIGHT / (2 * np.pi))


def building_charge_factor(height, frequency, body: BuildingBody, case=1):
    """:func:`induced_charge_factor` of a building, held below its limit frequency, for a shielding case. [1]

    Case 1 (nominal) is the roof-loaded line; case 2 (the most shielding,
    the least signal) the bare line (no roof loading); case 0 the loading's
    effect doubled in dB, F_1^2 / F_2: the roof's share taken as the
    uncertainty, either way. Above :func:`building_limit_frequency` every
    case is held at its value there.

    Parameters
    ----------
    height : array_like
        Height above the ground where the factor is wanted. [m]
    frequency : array_like
        [Hz]
    body : BuildingBody
        The building (its height and footprint give the line and its roof).
    case : int or sequence of int
        0, 1 or 2 as above; a sequence gives every case it names, the roof
        loading and the limit frequency worked out once for them all. [1]

    Returns
    -------
    ndarray
        F for each height and frequency (broadcast); for a sequence of
        cases, stacked along a new first axis in their order. [1]

    References
    ----------
    The line is King's receiving antenna with Laport's top loading (module references [4], [5]; from memory).
    The spread of cases 0 and 2 around case 1 is this project's own bound on the roof's share, not a published
    figure.

    Examples
    --------
    >>> body = BuildingBody([[0, 0], [24, 0], [24, 12], [0, 12]], 21.0, "steel frame")
    >>> [round(float(building_charge_factor(12.6, 1.71e6, body, c)), 3) for c in (0, 1, 2)]
    [2.047, 1.646, 1.324]
    >>> [round(float(v), 3) for v in building_charge_factor(12.6, 1.71e6, body, (0, 1, 2))]
    [2.047, 1.646, 1.324]
    """
    cases = [case] if np.ndim(case) == 0 else list(case)
    for c in cases:
        if c not in (0, 1, 2):
            raise ModelInputError(f"case must be 0, 1 or 2; got {c!r}")
    dh, f_limit = _line_constants(body)
    f = np.minimum(np.asarray(frequency, dtype=float), f_limit)
    k, sinc = _height_sinc(height, f, body.height_m)  # shared by the loaded and the bare line
    loaded = _loaded_line(k, sinc, body.height_m, dh)
    bare = _loaded_line(k, sinc, body.height_m, 0.0) if any(c != 1 for c in cases) else None
    factors = [loaded if c == 1 else bare if c == 2 else loaded * loaded / bare for c in cases]
    return factors[0] if np.ndim(case) == 0 else np.stack(factors)


def _line_constants(body: BuildingBody):
    """The building's roof loading length [m] (:func:`roof_loading_length`) and limit frequency [Hz]
    (:func:`building_limit_frequency`), worked out once per footprint and height."""
    key = (body.footprint.tobytes(), body.footprint.shape, float(body.height_m))
    found = _LINE_CONSTANTS.get(key)
    if found is None:
        dh = roof_loading_length(body.height_m, roof_equivalent_radius(body.footprint))
        found = (dh, building_limit_frequency(body.height_m, dh))
        if len(_LINE_CONSTANTS) >= 16:
            _LINE_CONSTANTS.pop(next(iter(_LINE_CONSTANTS)))
        _LINE_CONSTANTS[key] = found
    return found


#: Roof loading lengths and limit frequencies already worked out, by footprint and height (the last 16).
_LINE_CONSTANTS: dict = {}


def scale_screened_field(static, height, factor):
    """A static screened field height with the building's induced charge scaled by ``factor``.

    Parameters
    ----------
    static : array_like
        phi / E0 of the static field beside the grounded building (:meth:`BoxScreen.field_height`). [m]
    height : array_like
        Height above the ground. [m]
    factor : array_like
        The building's induced charge relative to static at that height (:func:`induced_charge_factor`). [1]

    Returns
    -------
    ndarray
        phi_f = phi [1 + (F - 1)(1 - phi / z)], in metres of open-ground height. [m]

    Notes
    -----
    Beside the wall the field is the building's surface charge over eps0
    (Gauss), so the potential a short way out, d sigma / eps0, scales by F;
    far away the building's charge no longer matters and phi -> z. The
    screened share 1 - phi/z of the static field (1 on the wall, 0 in open
    ground) carries the one into the other. An interpolation between the two
    limits, each exact; checked against the full-wave grid in
    docs/models-building.md.

    References
    ----------
    The limits: Gauss's law at a conductor's surface and the static field far from it (Jackson sec. 1.6, module
    reference [2]; from memory). The interpolation between them is this project's own, a consistency check
    against the project's full-wave grid (table in docs/models-building.md).

    Examples
    --------
    >>> float(scale_screened_field(1.2, 12.6, 1.0))
    1.2
    >>> round(float(scale_screened_field(12.6, 12.6, 1.5)), 3)
    12.6
    """
    phi = np.asarray(static, dtype=float)
    z = np.maximum(np.asarray(height, dtype=float), 0.0)
    screened = np.where(z > 0, 1.0 - phi / np.where(z > 0, z, 1.0), 0.0)
    return phi * (1.0 + (np.asarray(factor, dtype=float) - 1.0) * np.clip(screened, 0.0, 1.0))


def dynamic_field_height(distance, height, wall_height, factor):
    """The two-dimensional wall's field (:func:`facade_field_height`) scaled by ``factor``
    (:func:`scale_screened_field`): the check of the building's currents on an infinitely long wall. [m]

    Parameters
    ----------
    distance, height : array_like
        In front of the wall and above the ground. [m]
    wall_height : float
        The wall's height. [m]
    factor : array_like
        The building's induced-charge factor F (:func:`induced_charge_factor`). [1]

    References
    ----------
    Smythe's conformal map of the grounded plane with a perpendicular strip (module reference [1]) and the
    receiving line of King ([4]). (from memory)

    Examples
    --------
    >>> static = facade_field_height(1.6, 12.6, 21.0)
    >>> bool(abs(dynamic_field_height(1.6, 12.6, 21.0, 1.0) - static) < 1e-12)
    True
    >>> round(float(dynamic_field_height(1e5, 12.6, 21.0, 1.5)), 3)
    12.6
    """
    return scale_screened_field(facade_field_height(distance, height, wall_height), height, factor)


def screened_field_height(body: BuildingBody, points, frequency=None, case: int = 1):
    """Open-ground height equivalent to the field a perfectly conducting ``body`` leaves, at a frequency. [m]

    ``points`` (..., 3) [m]; ``frequency`` None is the static field of the
    grounded box (:func:`box_screen`, solved once per building); else the
    frequency axis is the last: points (..., 3) and frequencies (F,) give
    (..., F). The building's own currents enter by :func:`building_charge_factor`
    and :func:`scale_screened_field`.

    References
    ----------
    Harrington's electrostatic moment solution of the box (module reference [7]) and King's receiving line
    ([4]). (from memory)

    Examples
    --------
    >>> body = BuildingBody([[0, -12], [24, -12], [24, 0], [0, 0]], 21.0, "steel frame")
    >>> round(float(screened_field_height(body, [12.0, 1.6, 12.6])), 2)
    1.33
    >>> [round(float(v), 2) for v in screened_field_height(body, [[12.0, 1.6, 12.6]], [1e3, 1.71e6])[0]]
    [1.33, 2.1]
    """
    p = np.asarray(points, dtype=float)
    static = box_screen(body).field_height(p)
    if frequency is None:
        return static
    z = p[..., 2:3]
    factor = building_charge_factor(z, np.asarray(frequency, dtype=float), body, case)
    return scale_screened_field(static[..., None], z, factor)


def shielding_blend(open_ground, perfect_screen, shielding):
    """A figure beside a building of partial shielding: open ground and the perfect screen blended by s.

    Parameters
    ----------
    open_ground : array_like
        The figure with no building (an effective or field height [m], a capacitance [F], a resistance [ohm]).
    perfect_screen : array_like
        The same figure beside a perfectly conducting building, in the same unit.
    shielding : array_like
        The construction's shielding fraction s, 0 (open ground) to 1 (a perfect conductor)
        (``SHIELDING_BY_CONSTRUCTION``). [1]

    Returns
    -------
    ndarray
        (1 - s) x_open + s x_screen, in the unit of the figures.

    Notes
    -----
    The construction's shielding fraction interpolates linearly between the
    two limits, each exact (module notes): h_e = (1 - s) h_e,open + s h_e,facade,
    likewise C, Rr and X.

    References
    ----------
    The limits: the method of images and the electrostatic box solution (module references [2], [7]; from
    memory). The fractions s are engineering judgement (common practice, from memory).

    Examples
    --------
    >>> float(shielding_blend(10.0, 2.0, 0.9))
    2.8
    >>> float(shielding_blend(10.0, 2.0, 0.0))
    10.0
    """
    s = np.asarray(shielding, dtype=float)
    return (1.0 - s) * np.asarray(open_ground, dtype=float) + s * np.asarray(perfect_screen, dtype=float)


def blended_field_height(body: BuildingBody, points, frequency=None):
    """Open-ground height equivalent to the field beside ``body`` at its construction's nominal shielding. [m]

    Parameters
    ----------
    body : BuildingBody
        The building.
    points : array_like, shape (..., 3)
        Where the field is wanted, x, y and the height above the ground. [m]
    frequency : float, optional
        One frequency at which the building's own currents are taken in; None: the static field. [Hz]

    Returns
    -------
    ndarray, shape (...)
        (1 - s) z + s phi, phi the field height beside the perfectly conducting building
        (:func:`screened_field_height`) and s its construction's nominal shielding fraction. [m]

    Notes
    -----
    :func:`shielding_blend` of the open-ground field height (the height z
    itself) and the screened one: the field the report's closed form takes
    for the same building (:func:`facade_static_figures`), at single points.

    References
    ----------
    Harrington's electrostatic moment solution of the box (module reference [7]) and King's receiving line
    ([4]). (from memory)

    Examples
    --------
    >>> body = BuildingBody([[0, -12], [24, -12], [24, 0], [0, 0]], 21.0, "steel frame")
    >>> round(float(blended_field_height(body, [12.0, 1.6, 12.6])), 2)
    1.33
    >>> round(float(blended_field_height(BuildingBody(body.footprint, 21.0, "masonry"), [12.0, 1.6, 12.6])), 2)
    8.66
    """
    p = np.asarray(points, dtype=float)
    if frequency is None:
        screened = screened_field_height(body, p)
    else:
        screened = screened_field_height(body, p, [float(frequency)], 1)[..., 0]
    return shielding_blend(p[..., 2], screened, body.shielding[1])


def plan_distance(points_xy, footprint):
    """Distance in plan from each point to a polygon's edge, 0 inside. [m]

    Examples
    --------
    >>> square = [[0, 0], [10, 0], [10, 10], [0, 10]]
    >>> [float(v) for v in plan_distance([[5, 5], [13, 5], [13, 14]], square)]
    [0.0, 3.0, 5.0]
    """
    p = np.asarray(points_xy, dtype=float).reshape(-1, 2)
    a = np.asarray(footprint, dtype=float)
    b = np.concatenate([a[1:], a[:1]])
    ab = b - a
    ax, ay, abx, aby = a[:, 0:1], a[:, 1:2], ab[:, 0:1], ab[:, 1:2]  # edges down the rows, points across
    px, py = p[:, 0], p[:, 1]
    length2 = abx * abx + aby * aby
    # a corner given twice makes an edge of no length: its nearest point is the corner itself (t = 0)
    t = np.minimum(np.maximum(((px - ax) * abx + (py - ay) * aby) / np.where(length2 > 0, length2, 1.0), 0.0),
                   1.0)  # clipped to the edge
    ex, ey = px - (ax + t * abx), py - (ay + t * aby)  # from the nearest point of each edge
    dist = np.sqrt(np.min(ex * ex + ey * ey, axis=0))
    # inside: odd number of edge crossings of a ray towards +x
    ya, yb = ay, b[:, 1:2]
    straddle = (ya > py) != (yb > py)
    # only where an edge straddles the ray (there |py - ya| <= |yb - ya| and yb != ya): elsewhere the ratio is
    # not used, and for an edge a denormal apart in y it would overflow
    x_cross = ax + np.where(straddle, py - ya, 0.0) / np.where(straddle, yb - ya, 1.0) * abx
    inside = np.logical_xor.reduce(straddle & (px < x_cross), axis=0)  # an odd count
    return np.where(inside, 0.0, dist)


def length_over_roof(start, end, footprint, roof_height_m) -> float:
    """Length of straight wires that runs inside a footprint in plan and above the roof's height. [m]

    Each wire is cut where it crosses an edge of the footprint in plan or the roof's height, and each piece
    counted by its midpoint.

    Parameters
    ----------
    start, end : array_like, shape (N, 3)
        Wire ends. [m]
    footprint : array_like, shape (K, 2)
        The building's outline in plan. [m]
    roof_height_m : float
        Height of the roof. [m]

    Examples
    --------
    >>> float(length_over_roof([[2, 5, 9]], [[40, 5, 9]], [[0, 0], [10, 0], [10, 8], [0, 8]], 7.0))
    8.0
    >>> float(length_over_roof([[2, 5, 9]], [[2, 5, 1]], [[0, 0], [10, 0], [10, 8], [0, 8]], 7.0))
    2.0
    """
    s, e = np.atleast_2d(np.asarray(start, dtype=float)), np.atleast_2d(np.asarray(end, dtype=float))
    a = np.asarray(footprint, dtype=float)
    if not _may_cross_roof(s, e, a, roof_height_m):
        return 0.0
    ab = np.roll(a, -1, axis=0) - a
    d = (e - s)[:, None, :2]  # wires down, edges across
    denom = d[..., 0] * ab[None, :, 1] - d[..., 1] * ab[None, :, 0]
    rel = a[None] - s[:, None, :2]
    safe = np.where(denom == 0.0, 1.0, denom)
    with np.errstate(over="ignore", invalid="ignore"):  # a wire of next to no length in plan: no cut, not inf
        t = (rel[..., 0] * ab[None, :, 1] - rel[..., 1] * ab[None, :, 0]) / safe  # along the wire
        u = (rel[..., 0] * d[..., 1] - rel[..., 1] * d[..., 0]) / safe  # along the edge
    t = np.where((denom != 0.0) & np.isfinite(t) & (u >= 0.0) & (u <= 1.0), t, 0.0)
    dz = e[:, 2] - s[:, 2]
    t_roof = np.where(dz != 0.0, (roof_height_m - s[:, 2]) / np.where(dz == 0.0, 1.0, dz), 0.0)
    cuts = np.sort(np.clip(np.concatenate([np.zeros((len(s), 1)), t, t_roof[:, None], np.ones((len(s), 1))],
                                          axis=1), 0.0, 1.0), axis=1)
    mid_t = 0.5 * (cuts[:, 1:] + cuts[:, :-1])
    mid = s[:, None, :] + mid_t[..., None] * (e - s)[:, None, :]
    inside = (plan_distance(mid[..., :2].reshape(-1, 2), a).reshape(mid_t.shape) <= 0.0) & (mid[..., 2] > roof_height_m)
    return float(np.sum(np.where(inside, np.diff(cuts, axis=1), 0.0) * np.linalg.norm(e - s, axis=1)[:, None]))


def _may_cross_roof(s, e, footprint, roof_height_m) -> bool:
    """Whether any wire ``s`` -> ``e`` (N, 3) [m] has a part above the roof's height [m] whose bounding box in plan
    (widened by a micrometre against rounding) meets the footprint's: where none has, no wire runs over the roof."""
    dz = e[:, 2] - s[:, 2]
    # the part of each wire above the roof's height, as a range of its parameter (empty where it stays below)
    with np.errstate(divide="ignore", invalid="ignore"):
        t_roof = np.where(dz != 0.0, (roof_height_m - s[:, 2]) / np.where(dz == 0.0, 1.0, dz), 0.0)
    t0 = np.where(dz > 0.0, np.clip(t_roof, 0.0, 1.0), 0.0)
    t1 = np.where(dz < 0.0, np.clip(t_roof, 0.0, 1.0), 1.0)
    above = (np.maximum(s[:, 2], e[:, 2]) > roof_height_m) & (t1 >= t0)
    if not np.any(above):
        return False
    p0 = s[:, :2] + t0[:, None] * (e - s)[:, :2]
    p1 = s[:, :2] + t1[:, None] * (e - s)[:, :2]
    margin = 1e-6
    return bool(np.any(above & np.all(np.maximum(p0, p1) >= footprint.min(axis=0) - margin, axis=1)
                       & np.all(np.minimum(p0, p1) <= footprint.max(axis=0) + margin, axis=1)))


def _facades(footprint, points_xy) -> tuple:
    """Each footprint edge as a facade seen from the points: (corners (K, 2), edge vectors (K, 2), outward unit
    normals (K, 2), the points' mean distance from each edge (K,) [m], whether every point is in front of each
    edge's plane (K,))."""
    a = np.asarray(footprint, dtype=float)
    ab = np.roll(a, -1, axis=0) - a
    p = np.asarray(points_xy, dtype=float).reshape(-1, 2)
    t = np.clip(np.einsum("pkj,kj->pk", p[:, None, :] - a[None], ab) / np.einsum("kj,kj->k", ab, ab), 0.0, 1.0)
    d = np.linalg.norm(p[:, None, :] - (a[None] + t[..., None] * ab[None]), axis=-1)
    normals = np.stack([ab[:, 1], -ab[:, 0]], axis=1) / np.linalg.norm(ab, axis=1)[:, None]
    flip = np.einsum("kj,kj->k", np.mean(a, axis=0)[None] - a, normals) > 0  # point each away from the building
    normals = np.where(flip[:, None], -normals, normals)
    signed = np.einsum("pkj,kj->pk", p[:, None, :] - a[None], normals)
    return a, ab, normals, np.mean(d, axis=0), np.min(signed, axis=0) >= -WALL_CLEARANCE_M


def _facade(a, normals, k) -> tuple:
    """Facade ``k`` as (a point on it, its outward unit normal), both in 3-D. [m], [1]"""
    return np.array([a[k, 0], a[k, 1], 0.0]), np.array([normals[k, 0], normals[k, 1], 0.0])


def nearest_facade(footprint, points_xy):
    """The footprint edge nearest the points (mean distance): (point on it, outward unit normal).

    Examples
    --------
    >>> p0, n = nearest_facade([[0, -10], [10, -10], [10, 0], [0, 0]], [[2, 1.5], [6, 1.5]])
    >>> [float(v) for v in n]
    [0.0, 1.0, 0.0]
    """
    a, _, normals, mean_distance, all_in_front = _facades(footprint, points_xy)
    # prefer a facade with every point in front of its plane, then the nearest
    return _facade(a, normals, int(np.argmin(mean_distance + np.where(all_in_front, 0.0, 1e12))))


def facade_for_wires(footprint, start, end):
    """The facade a set of aerial wires stands in front of: (point on it, outward unit normal).

    The wires' own ends choose it (an earth lead to a rod by another wall or a receiver indoors does not):
    the nearest facade with every end outside the footprint in front of its plane (:func:`nearest_facade`).
    Where no facade has them all in front -- a lead-in that crosses to the building's far side, a span that
    wraps round a corner -- it is the facade with the most wire in front of its plane, then the nearest.

    Parameters
    ----------
    footprint : array_like, shape (K, 2)
        The building's outline in plan. [m]
    start, end : array_like, shape (N, 3)
        The aerial wires' ends (the lead-in's included; no earth wire). [m]

    Examples
    --------
    >>> p0, n = facade_for_wires([[0, 0], [10, 0], [10, 8], [0, 8]], [[12, 4, 8], [12, 4, 8]],
    ...                          [[30, 4, 9], [-5, 4, 1]])
    >>> [float(v) + 0.0 for v in n]  # the east facade (+ 0.0: no minus zero)
    [1.0, 0.0, 0.0]
    """
    s, e = np.atleast_2d(np.asarray(start, dtype=float)), np.atleast_2d(np.asarray(end, dtype=float))
    ends = np.concatenate([s, e])[:, :2]
    return _facade_for_ends(footprint, s, e, plan_distance(ends, footprint))


def _facade_for_ends(footprint, s, e, ends_distance):
    """:func:`facade_for_wires` of the wires ``s`` -> ``e`` (N, 3) [m], given the plan distance of their ends
    (the N starts, then the N ends) from the footprint [m]."""
    ends = np.concatenate([s, e])[:, :2]
    a, _, normals, mean_distance, all_in_front = _facades(footprint, ends[ends_distance > 0])
    if np.any(all_in_front):
        return _facade(a, normals, int(np.argmin(mean_distance + np.where(all_in_front, 0.0, 1e12))))
    d0 = np.einsum("nkj,kj->nk", s[:, None, :2] - a[None], normals)  # wires down, facades across
    d1 = np.einsum("nkj,kj->nk", e[:, None, :2] - a[None], normals)
    crossing = (d0 > 0) != (d1 > 0)
    t = np.where(crossing, d0 / np.where(crossing, d0 - d1, 1.0), 0.0)  # where the wire meets the plane
    fraction = np.where(crossing, np.where(d0 > 0, t, 1.0 - t), (d0 > 0).astype(float))
    in_front = np.round(np.sum(fraction * np.linalg.norm(e - s, axis=1)[:, None], axis=0), 3)  # [m], to the mm
    return _facade(a, normals, int(np.lexsort((mean_distance, -in_front))[0]))  # the most wire in front, then nearest


def _in_front(segments: Segments, p0, n):
    """The wires cut at the facade plane, only the pieces in front of it kept (a new Segments)."""
    s0 = (segments.start - p0) @ n
    s1 = (segments.end - p0) @ n
    keep_start, keep_end = s0 > WALL_CLEARANCE_M, s1 > WALL_CLEARANCE_M
    crossing = keep_start != keep_end
    t = np.where(crossing, (WALL_CLEARANCE_M - s0) / np.where(s1 == s0, 1.0, s1 - s0), 0.0)
    cut = segments.start + t[:, None] * (segments.end - segments.start)
    start = np.where((crossing & ~keep_start)[:, None], cut, segments.start)
    end = np.where((crossing & ~keep_end)[:, None], cut, segments.end)
    m = (keep_start | keep_end) & (np.linalg.norm(end - start, axis=1) > 1e-3)
    return Segments(start[m], end[m], segments.radius[m], segments.grounded[m], segments.feed,
                    segments.wire_index[m], segments.resistivity[m], segments.relative_permeability[m],
                    segments.electrode_ohm)


def facade_static_figures(segments: Segments, body: BuildingBody, open_capacitance_f: float,
                          open_effective_height_m: float, frequency=None) -> dict:
    """Static capacitance and effective height of a wire set beside a building, with their range.

    Parameters
    ----------
    segments : Segments
        Aerial and earth lead. Frame: m, z up, ground z = 0.
    body : BuildingBody
        The building.
    open_capacitance_f : float
        Capacitance of the same wires over open ground. [F]
    open_effective_height_m : float
        Static effective height over open ground. [m]
    frequency : array_like, optional
        Frequencies at which to take in the building's own currents. [Hz]

    Returns
    -------
    dict
        ``capacitance_f`` and ``effective_height_m`` as (low-shielding,
        nominal, high-shielding) tuples [F], [m]; ``facade_capacitance_f``,
        ``facade_effective_height_m`` (the perfect-plane limit) [F], [m];
        ``shielding`` (low, nominal, high) [1]; ``facade_distance_m`` (mean
        plan distance of the aerial wire from the building) [m];
        ``shielded_lead_m`` (wire inside or against the building, left out of
        the pick-up) [m]; ``notes`` (list of str). With ``frequency`` also
        ``effective_height_by_frequency_m`` and
        ``facade_effective_height_by_frequency_m``, shape (3, F), the same
        with the building's induced charge at each frequency
        (:func:`building_charge_factor`, its case 0, 1, 2 with the shielding's
        low, nominal, high) [m], and ``limit_frequency_hz``
        (:func:`building_limit_frequency`) [Hz].

    Notes
    -----
    The facade limit keeps only the wire in front of the nearest facade
    plane (what runs inside a conducting building -- the riser, the lead-in
    through the wall -- is screened and bonded to it), solves the charges at
    1 V with images in the ground and the facade (``wall`` of
    :func:`electrostatic_solution`), and takes h_e = sum(q phi) / Q with phi
    the static field height beside the grounded box (:func:`box_screen`,
    solved once per building). The construction's shielding fraction
    s blends it with the open-ground figures (module notes).

    References
    ----------
    Harrington, ch. 2 (the box's charges), and Jackson, sec. 2.1-2.2 (images in two perpendicular grounded planes)
    (module references [7], [2]; from memory).

    Examples
    --------
    >>> from aerial.models.segments import polyline_segments
    >>> s = polyline_segments([[0, 1.5, 0.02], [0, 1.5, 10], [6, 1.5, 10]], 1e-3)
    >>> body = BuildingBody([[-10, -12], [20, -12], [20, 0], [-10, 0]], 18.0, "steel frame")
    >>> r = facade_static_figures(s, body, 100e-12, 8.0)
    >>> r["effective_height_m"][1] < 2.0
    True
    """
    sol = _facade_solution(segments, body)
    charge, phi, q_aer = sol["charge_c"], sol["field_height_m"], sol["aerial_charge_c"]
    h_wall, c_wall = float(np.sum(charge * phi) / q_aer), sol["capacitance_f"]
    s = np.array(body.shielding)
    he = shielding_blend(open_effective_height_m, h_wall, s)
    cap = shielding_blend(open_capacitance_f, c_wall, s)
    dynamic = {}
    if frequency is not None:
        f = np.atleast_1d(np.asarray(frequency, dtype=float))
        wall_f = _scaled_field_sums(charge, phi, sol["height_m"], f, body) / q_aer
        dynamic = {
            "effective_height_by_frequency_m": shielding_blend(open_effective_height_m, wall_f, s[:, None]),
            "facade_effective_height_by_frequency_m": wall_f,
            "limit_frequency_hz": _line_constants(body)[1],
        }
    return dynamic | {
        "capacitance_f": tuple(float(v) for v in cap),
        "effective_height_m": tuple(float(v) for v in he),
        "facade_capacitance_f": c_wall,
        "facade_effective_height_m": h_wall,
        "shielding": tuple(float(v) for v in s),
        "facade_distance_m": sol["facade_distance_m"],
        "shielded_lead_m": sol["shielded_lead_m"],
        "notes": list(sol["notes"]),
    }


def _scaled_field_sums(charge, phi, height, frequency, body: BuildingBody):
    """sum_i q_i phi_i(f) over the charges for the three cases of :func:`building_charge_factor`, (3, F)
    [C m]: the static field heights ``phi`` [m] at the charges' ``height`` [m] scaled by
    :func:`scale_screened_field` at each ``frequency`` [Hz].

    The building's factor is sin(k z)/(k z) times a function of the frequency alone, g_c(f)
    (:func:`induced_charge_factor`: cos(delta) / cos(kH + delta), the bare line's 1 / cos(kH), and
    g_1^2 / g_2 for case 0), and :func:`scale_screened_field` is linear in it, so the sum is
    sum q phi (1 - S) + g_c(f) sum q phi S sin(k z)/(k z), S the screened share clip(1 - phi / z, 0, 1):
    one (charges, frequencies) array instead of three, the same sum in another order.
    """
    dh, f_limit = _line_constants(body)
    k, sinc = _height_sinc(np.reshape(height, (-1, 1)), np.minimum(frequency, f_limit), body.height_m)
    loaded = _loaded_line(k, 1.0, body.height_m, dh)
    bare = _loaded_line(k, 1.0, body.height_m, 0.0)
    z = np.maximum(np.asarray(height, dtype=float), 0.0)
    screened = np.clip(np.where(z > 0, 1.0 - phi / np.where(z > 0, z, 1.0), 0.0), 0.0, 1.0)
    weight = charge * phi
    static = float(np.sum(weight * (1.0 - screened)))
    moving = (weight * screened) @ sinc  # (F,)
    return static + np.stack([loaded * loaded / bare, loaded, bare]) * moving


def _facade_solution(segments: Segments, body: BuildingBody) -> dict:
    """The wires' charges at 1 V beside the building's nearest facade and the box's field height at them.

    Kept per wire set and building (the report's what-ifs ask again for the nominal wires' figures): a dict of
    ``charge_c`` [C], ``height_m`` and ``field_height_m`` at the charges [m], ``aerial_charge_c`` [C],
    ``capacitance_f`` [F], ``facade_distance_m`` [m], ``shielded_lead_m`` [m] and ``notes`` (tuple of str).
    """
    key = (body.footprint.tobytes(), float(body.height_m), float(segments.electrode_ohm)) + tuple(
        np.asarray(getattr(segments, name)).tobytes() for name in
        ("start", "end", "radius", "grounded", "feed", "wire_index", "resistivity", "relative_permeability"))
    found = _FACADE_SOLUTIONS.get(key)
    if found is not None:
        return found
    s, e = segments.start[segments.aerial], segments.end[segments.aerial]
    # the plan distances of the aerial wires' midpoints and of their ends, in one call
    dist, ends_distance = np.split(plan_distance(np.concatenate([0.5 * (s + e), s, e])[:, :2], body.footprint),
                                   [len(s)])
    if not np.any(dist > 0):
        raise ModelInputError("every aerial wire is inside the building's footprint; a wire inside a building "
                              "is not modelled")
    p0, n = _facade_for_ends(body.footprint, s, e, ends_distance)
    front = _in_front(segments, p0, n)
    if not np.any(front.aerial):
        raise ModelInputError("no aerial wire is in front of the building's nearest facade")
    es = electrostatic_solution(front, wall=(p0, n), target_unknowns=FACADE_TARGET_UNKNOWNS,
                                max_subsegment_fraction=1.0 / 8.0, convergence_check=False)  # its report is not read
    mid = 0.5 * (es.start + es.end)
    mid_distance = plan_distance(mid[:, :2], body.footprint)  # for the note just below and the field heights
    notes = ()
    if np.any(mid_distance <= 0):
        notes = ("part of the wire is over the roof or round a corner of the building; the facade images there are "
                 "approximate",)
    over_roof = length_over_roof(segments.start[segments.aerial], segments.end[segments.aerial], body.footprint,
                                 body.height_m)
    if over_roof > 0:
        notes += (words("{l} of the wire runs over the roof (inside the outline in plan): it is counted with the lead-in "
                        "as screened by the building, which understates a wire high above a conducting roof",
                        l=metres(over_roof)),)
    found = {
        "charge_c": es.charge_c, "height_m": mid[:, 2], "field_height_m": box_screen(body).field_height(mid, mid_distance),
        "aerial_charge_c": float(np.sum(es.charge_c[~es.grounded])), "capacitance_f": float(es.capacitance_f),
        "facade_distance_m": float(np.average(dist, weights=segments.length[segments.aerial])),
        "shielded_lead_m": float(np.sum(segments.length) - np.sum(front.length)), "notes": notes,
    }
    if len(_FACADE_SOLUTIONS) >= 16:
        _FACADE_SOLUTIONS.pop(next(iter(_FACADE_SOLUTIONS)))
    _FACADE_SOLUTIONS[key] = found
    return found


#: Facade solutions already worked out, by wire set and building (the last 16).
_FACADE_SOLUTIONS: dict = {}


# --------------------------------------------------------------------------- the building's own static screening

#: Panels of the box's surface (walls and roof) in its static solution: the field height a wire 1.6 m from a
#: facade sees moves by less than 1 % from 400 to 1600 panels on the towers of docs/models-building.md
#: (consistency check, tests/models/test_building.py). [1]
BOX_TARGET_PANELS = 400
#: Pairs farther apart than this many half-diagonals of the source panel take its charge as a point charge;
#: nearer pairs integrate the panel exactly. [1]
BOX_NEAR_HALF_DIAGONALS = 5.0
#: Floor of the logarithms' arguments in :func:`rectangle_potential_integral`, reached only where the factor
#: that multiplies the logarithm is zero. [m]
_LOG_FLOOR = 1e-300
_BOX_SCREENS: dict = {}
#: Field heights already worked out, by box and points (the last 32 asked for).
_FIELD_HEIGHTS: dict = {}


class BoxScreen(NamedTuple):
    """The charge a grounded box (a building on the grounded plane) takes in a uniform vertical field.

    Attributes
    ----------
    centre : ndarray, shape (N, 3)
        Panel centres. [m]
    axis_u, axis_v : ndarray, shape (N, 3)
        Unit vectors along the panel's two sides. [1]
    half_u, half_v : ndarray, shape (N,)
        Half the panel's side along each. [m]
    charge : ndarray, shape (N,)
        Surface charge density over 4 pi eps0 E0, uniform on each panel (its image in the ground the
        opposite). [1]
    height_m : float
        Roof height of the box. [m]
    footprint : ndarray, shape (K, 2)
        Plan corners. [m]
    """

    centre: np.ndarray
    axis_u: np.ndarray
    axis_v: np.ndarray
    half_u: np.ndarray
    half_v: np.ndarray
    charge: np.ndarray
    height_m: float
    footprint: np.ndarray

    def field_height(self, points, plan_distance_m=None):
        """phi / E0 at ``points`` (..., 3): z plus the potential of the box's charges and their images. [m]

        Held to [0, z] (the grounded box's induced charge is all of one sign) and 0 inside the box.
        ``plan_distance_m`` (...): the points' :func:`plan_distance` from the footprint, when the caller has it. [m]
        """
        p = np.asarray(points, dtype=float)
        key = (self.footprint.tobytes(), self.height_m, len(self.charge), p.shape, p.tobytes())
        found = _FIELD_HEIGHTS.get(key)
        if found is not None:  # the report's tolerance runs ask again for the same wire's charges
            return found.copy()
        flat = p.reshape(-1, 3)
        pot = _panels_potential(flat, self, self.charge)
        z = np.maximum(flat[:, 2], 0.0)
        phi = np.clip(z + pot, 0.0, z)
        inside = flat[:, 2] < self.height_m  # below the roof, and then over the footprint
        if np.any(inside):
            inside[inside] = (plan_distance(flat[inside, :2], self.footprint) if plan_distance_m is None
                              else np.reshape(plan_distance_m, -1)[inside]) <= 0.0
        out = np.where(inside, 0.0, phi).reshape(p.shape[:-1])
        if len(_FIELD_HEIGHTS) >= 32:
            _FIELD_HEIGHTS.pop(next(iter(_FIELD_HEIGHTS)))
        _FIELD_HEIGHTS[key] = out.copy()
        return out


def rectangle_potential_integral(u, v, w, half_u, half_v):
    """Integral of 1/R over a rectangle, seen from a point in its own frame. [m]

    Parameters
    ----------
    u, v : array_like
        The point's coordinates along the rectangle's sides, from its centre. [m]
    w : array_like
        The point's distance from the rectangle's plane. [m]
    half_u, half_v : array_like
        Half the rectangle's sides. [m]

    Returns
    -------
    ndarray
        I = integral over the rectangle of dA / |r - r'|; a uniform surface
        charge sigma on it has the potential sigma I / (4 pi eps0). [m]

    Notes
    -----
    With X, Y the coordinates of a corner relative to the point and
    r = sqrt(X^2 + Y^2 + w^2), the antiderivative is::

        G(X, Y) = X ln(Y + r) + Y ln(X + r) - w arctan(X Y / (w r))

    taken with the signs + - - + over the four corners [1]. It is evaluated
    as::

        X sgn(Y) [ln(|Y| + r) - ln rho_X] + Y sgn(X) [ln(|X| + r) - ln rho_Y]
            - w arctan2(X Y, w r),          rho_X = sqrt(X^2 + w^2)

    the same sum: X ln rho_X cancels between the two corners that share X,
    and ln(Y + r) - ln rho_X = asinh(Y / rho_X) is odd in Y. No logarithm
    of a difference is taken (stable on the far side of a corner, Y < 0),
    and a point on a side's line or in the rectangle's plane needs no
    special case. At the centre of
    the rectangle itself (w = 0) it gives the known self term
    2a ln((b + d)/a) + 2b ln((a + d)/b), a and b the sides, d the diagonal
    (for a square of side a: 4 a ln(1 + sqrt 2)) [2].

    References
    ----------
    .. [1] J. L. Hess and A. M. O. Smith, "Calculation of potential flow about
       arbitrary bodies", Progress in Aeronautical Sciences 8, 1-138, 1967
       (the source panel's potential in closed form). (from memory)
    .. [2] E. Durand, *Electrostatique*, vol. 1, Masson, 1964 (the uniformly
       charged rectangle). (from memory)

    Examples
    --------
    >>> round(float(rectangle_potential_integral(0.0, 0.0, 0.0, 0.5, 0.5)), 6)
    3.525494
    >>> round(float(rectangle_potential_integral(0.0, 0.0, 1e4, 0.5, 0.5) * 1e4), 6)
    1.0
    """
    u, v, w, hu, hv = np.broadcast_arrays(*(np.asarray(t, dtype=float) for t in (u, v, w, half_u, half_v)))
    w = np.abs(w)
    w2 = w * w
    xs = [(x, x * x) for x in (hu - u, -hu - u)]  # the corners' two X and two Y, and their squares
    ys = [(y, y * y) for y in (hv - v, -hv - v)]
    # ln rho: the point's distance from the line of each side, floored where it is 0 (its factor X or Y is 0 there)
    log_x = [0.5 * np.log(np.maximum(x2 + w2, _LOG_FLOOR)) for _, x2 in xs]
    log_y = [0.5 * np.log(np.maximum(y2 + w2, _LOG_FLOOR)) for _, y2 in ys]
    total = np.zeros(u.shape)
    r, first, second = (np.empty(u.shape) for _ in range(3))  # worked in place: few arrays alive at once
    for ix, iy, sign in ((0, 0, 1.0), (1, 0, -1.0), (0, 1, -1.0), (1, 1, 1.0)):
        (x, x2), (y, y2) = xs[ix], ys[iy]
        np.add(x2, y2, out=r)
        r += w2
        np.sqrt(r, out=r)
        _log_term(x, y, r, log_x[ix], first)  # x sgn(y) [ln(|y| + r) - ln rho_X]
        _log_term(y, x, r, log_y[iy], second)  # y sgn(x) [ln(|x| + r) - ln rho_Y]
        first += second
        np.multiply(x, y, out=second)
        r *= w
        np.arctan2(second, r, out=second)
        second *= w
        first -= second  # the corner's G(X, Y)
        first *= sign
        total += first
    return total


def _log_term(x, y, r, log_rho, out):
    """x sgn(y) [ln(max(|y| + r, floor)) - ln rho] into ``out`` (an array of x's shape), in place. [m]"""
    np.abs(y, out=out)
    out += r
    np.maximum(out, _LOG_FLOOR, out=out)
    np.log(out, out=out)
    out -= log_rho
    np.copysign(out, y, out=out)
    out *= x


#: Largest (points × panels) plane :func:`_panels_potential` takes from
#: :func:`aerial.core.arrays.scratch_planes` (reused memory, no first-touch page faults) instead of fresh
#: arrays. [1]
PANEL_BUFFER_ELEMENTS = 1 << 17


def _panel_planes(rows: int, cols: int, fresh: bool):
    """Two (rows, cols) float planes: fresh arrays, or reused scratch when small enough and the caller keeps
    neither of them."""
    if fresh or rows * cols > PANEL_BUFFER_ELEMENTS:
        return [np.empty((rows, cols)) for _ in range(2)]
    return list(scratch_planes(rows, cols, 2))


def _squared_distances(points, box, out):
    """Squared distances from every point to every panel's centre and to its image in the ground, into the two
    (M, N) planes ``out``. [m^2]

    Each plane is one matrix product: with q the points and c the centres taken from a point on the ground
    under the box (the centres' mean in plan), |q - c|^2 = |q|^2 + |c|^2 - 2 q . c is the product of the rows
    (q, |q|^2, 1) and the columns (-2 c, 1, |c|^2); the image's centre is c with its height negated. Taken
    from that point, |q|^2 + |c|^2 is at most (d + 2 R)^2 + R^2 for a pair a distance d apart in a box of
    radius R, so the rounding is a few parts in 1e15 of the squared distance of any pair the panel's charge
    is taken as a point for (d > five half-diagonals); nearer pairs are integrated exactly afterwards.
    """
    centre = box.centre
    origin = np.array([float(np.mean(centre[:, 0])), float(np.mean(centre[:, 1])), 0.0])
    q = points - origin
    c = centre - origin
    left = np.empty((len(q), 5))
    left[:, :3] = q
    left[:, 3] = _row_squares(q)
    left[:, 4] = 1.0
    right = np.empty((5, len(c)))
    np.multiply(c.T, -2.0, out=right[:3])
    right[3] = 1.0
    right[4] = _row_squares(c)
    np.matmul(left, right, out=out[0])
    right[2] *= -1.0  # the images: the centres' heights negated
    np.matmul(left, right, out=out[1])
    return out


def _row_squares(v):
    """|v|^2 of each row of an (K, 3) array, added left to right. [m^2]"""
    return (v[:, 0] * v[:, 0] + v[:, 1] * v[:, 1]) + v[:, 2] * v[:, 2]


def _panels_potential(points, box, weights=None, keep: bool = True):
    """Matrix (M, N): potential at each point of each panel's unit charge density and its ground image. [m]

    With ``weights`` (N,), the matrix times them instead, (M,) [m]. Worked out in reused scratch
    (:func:`aerial.core.arrays.scratch_planes`) unless the caller keeps the matrix (``keep`` and no
    ``weights``).

    A panel farther than ``BOX_NEAR_HALF_DIAGONALS`` of its half-diagonals is a point charge (area over
    distance); nearer ones are integrated exactly (:func:`rectangle_potential_integral`). The squared
    distances to the panels and to their images come from two matrix products (:func:`_squared_distances`),
    and a pair can be near its image only where it is near the panel itself (the points and the panels are
    above the ground), so the near pairs are looked for once.
    """
    reach2 = (BOX_NEAR_HALF_DIAGONALS ** 2) * (box.half_u ** 2 + box.half_v ** 2)
    area = 4.0 * box.half_u * box.half_v
    p = np.asarray(points, dtype=float).reshape(-1, 3)
    parts = _squared_distances(p, box, _panel_planes(len(p), len(box.centre), keep and weights is None))
    # the near pairs, as flat indices into the planes (gathers by one index are numpy's quick ``take``, where a
    # pair of index arrays goes element by element)
    flat = np.flatnonzero(parts[0] <= reach2)
    near_m, near_n = np.divmod(flat, len(box.centre))
    near = [np.arange(flat.size), np.flatnonzero(parts[1].reshape(-1).take(flat) <= reach2.take(near_n))]
    with np.errstate(divide="ignore", invalid="ignore"):  # a pair on one spot is near: worked out exactly below
        for part in parts:
            np.sqrt(part, out=part)
            np.divide(area, part, out=part)  # a point charge, far off
    _near_panels_exact(parts, near, flat, (near_m, near_n), p, box)
    np.subtract(parts[0], parts[1], out=parts[0])
    return parts[0] if weights is None else parts[0] @ np.asarray(weights, dtype=float)


def _near_panels_exact(parts, near, flat, pairs, points, box):
    """Overwrite the near pairs of the panels' and the images' planes (``parts``) with the exact integral over
    the panel (:func:`rectangle_potential_integral`), both planes' pairs in one call. [m]

    ``near``: per plane, the near pairs among the pairs near in plan (``flat``: their flat indices into the
    planes, ``pairs``: their point and panel); ``points``: the points, (M, 3). [m]
    """
    sizes = [len(k) for k in near]
    if sum(sizes) == 0:
        return
    near_m, near_n = pairs
    both = np.concatenate(near)
    m, n = near_m.take(both), near_n.take(both)
    cz = box.centre[:, 2].take(n)
    cz[sizes[0]:] *= -1.0  # the images' pairs: the panel mirrored in the ground
    r = [points[:, k].take(m) - c for k, c in enumerate((box.centre[:, 0].take(n), box.centre[:, 1].take(n), cz))]
    part = np.empty(len(n))
    uvw = []
    for axis in (box.axis_u, box.axis_v, _panel_normals(box)):  # r_x a_x + r_y a_y + r_z a_z, in place
        along = axis[:, 0].take(n)
        along *= r[0]
        along += np.multiply(axis[:, 1].take(n, out=part), r[1], out=part)
        along += np.multiply(axis[:, 2].take(n, out=part), r[2], out=part)
        uvw.append(along)
    exact = rectangle_potential_integral(*uvw, box.half_u.take(n), box.half_v.take(n))
    for part, idx, values in zip(parts, near, np.split(exact, [sizes[0]])):
        part.reshape(-1)[flat.take(idx)] = values


def _panel_normals(box):
    """Each panel's unit normal, axis_u x axis_v. [1]"""
    return np.cross(box.axis_u, box.axis_v)


def _graded(n, top_only=False):
    """n + 1 knots on [0, 1], closer together towards the ends (towards 1 only with ``top_only``): the
    charge of a conducting box grows without bound at its outer edges."""
    s = np.arange(n + 1) / n
    bend = np.sin(0.5 * np.pi * s) if top_only else 0.5 * (1.0 - np.cos(np.pi * s))
    return 0.5 * s + 0.5 * bend


def _box_panels(body: BuildingBody, target: int):
    """Panels of the walls and the roof: (centre, axis_u, axis_v, half_u, half_v)."""
    a = body.footprint
    b = np.roll(a, -1, axis=0)
    edge = np.linalg.norm(b - a, axis=1)
    roof = footprint_area(a)
    h = np.sqrt((float(np.sum(edge)) * body.height_m + roof) / target)
    zk = body.height_m * _graded(max(int(np.ceil(body.height_m / h)), 4), top_only=True)
    zm, hv = 0.5 * (zk[1:] + zk[:-1]), 0.5 * np.diff(zk)  # every wall's rows of panels
    parts = []
    for p, q, length in zip(a, b, edge):
        if length <= 0:
            continue
        t = _graded(max(int(np.ceil(length / h)), 2))
        along = (q - p) / length
        # the wall's grid, along the wall down the columns and up the wall along the rows, flattened
        tm = np.repeat(0.5 * (t[1:] + t[:-1]), zm.size)
        xy = p + tm.reshape(-1, 1) * (q - p)
        k = xy.shape[0]
        parts.append((np.column_stack([xy, np.tile(zm, t.size - 1)]),
                      np.broadcast_to([along[0], along[1], 0.0], (k, 3)), np.broadcast_to([0.0, 0.0, 1.0], (k, 3)),
                      np.repeat(0.5 * length * np.diff(t), zm.size), np.tile(hv, t.size - 1)))
    # the roof: a grid aligned with the longest edge, the cells whose centre is over the footprint
    k = int(np.argmax(edge))
    e1 = (b[k] - a[k]) / edge[k]
    e2 = np.array([-e1[1], e1[0]])
    lu, lv = a @ e1, a @ e2
    tu = lu.min() + (lu.max() - lu.min()) * _graded(max(int(np.ceil((lu.max() - lu.min()) / h)), 2))
    tv = lv.min() + (lv.max() - lv.min()) * _graded(max(int(np.ceil((lv.max() - lv.min()) / h)), 2))
    nu, nv = tu.size - 1, tv.size - 1
    xy = (np.repeat(0.5 * (tu[1:] + tu[:-1]), nv).reshape(-1, 1) * e1
          + np.tile(0.5 * (tv[1:] + tv[:-1]), nu).reshape(-1, 1) * e2)
    over = plan_distance(xy, a) <= 0.0
    n = int(np.sum(over))
    parts.append((np.column_stack([xy[over], np.full(n, body.height_m)]), np.broadcast_to([e1[0], e1[1], 0.0], (n, 3)),
                  np.broadcast_to([e2[0], e2[1], 0.0], (n, 3)), np.repeat(0.5 * np.diff(tu), nv)[over],
                  np.tile(0.5 * np.diff(tv), nu)[over]))
    return tuple(np.concatenate([part[i] for part in parts]) for i in range(5))


def _panel_grid(box):
    """The panels' centres on a grid far finer than any panel: (grid step [m], the box's size [m], the
    centres' grid points sorted, the order that sorts them), shared by every mirror plane tried."""
    size = max(float(np.ptp(box.centre)), 1.0)
    step = 1e-6 * size  # pair the panels on a grid far finer than any panel, then check them far closer
    mine = np.round(box.centre / step).astype(np.int64)
    order_mine = np.lexsort(mine.T[::-1])
    return step, size, mine[order_mine], order_mine


def _panel_mirror(box, point, normal, grid=None):
    """Index of each panel's mirror image across the vertical plane through ``point`` (plan) with the unit
    ``normal`` (plan), or None when the panels are not symmetric about that plane. ``grid``: the box's
    :func:`_panel_grid`, when the caller has it."""
    c = box.centre.copy()
    c[:, :2] -= 2.0 * ((c[:, :2] - point) @ normal)[:, None] * normal
    axis = box.axis_u.copy()
    axis[:, :2] -= 2.0 * (axis[:, :2] @ normal)[:, None] * normal
    step, size, mine_sorted, order_mine = _panel_grid(box) if grid is None else grid
    theirs = np.round(c / step).astype(np.int64)
    order_theirs = np.lexsort(theirs.T[::-1])
    if not np.array_equal(mine_sorted, theirs[order_theirs]):
        return None
    image = np.empty(len(c), dtype=np.int64)
    image[order_theirs] = order_mine
    same = (np.max(np.abs(box.centre[image] - c)) <= 1e-10 * size
            and np.all(np.abs(box.half_u[image] - box.half_u) <= 1e-9 * np.abs(box.half_u))  # numpy.allclose's
            and np.all(np.abs(box.half_v[image] - box.half_v) <= 1e-9 * np.abs(box.half_v))  # test, without its cost
            and np.all(np.abs(np.einsum("kj,kj->k", axis, box.axis_u[image])) > 1.0 - 1e-9))
    return image if same else None


def _same_plane(point, normal, point_0, normal_0, size) -> bool:
    """Whether two vertical planes (a point on each and its unit normal, in plan [m], [1]) are one, to within
    1e-12 of the box's ``size`` [m]: the panels' images in them are then the same."""
    return (abs(abs(float(np.dot(normal, normal_0))) - 1.0) <= 1e-12
            and abs(float(np.dot(point - point_0, normal_0))) <= 1e-12 * size)


def _mirror_classes(box):
    """Each panel's class under the footprint's mirror planes (the perpendicular bisectors of its edges that
    map the panels onto themselves): (representative panels, class of every panel)."""
    a = box.footprint
    b = np.roll(a, -1, axis=0)
    images, planes = [], []
    grid = _panel_grid(box)
    for p, q in zip(a, b):
        length = float(np.hypot(*(q - p)))
        if length <= 0:
            continue
        point, normal = 0.5 * (p + q), (q - p) / length
        if any(_same_plane(point, normal, *plane, grid[1]) for plane in planes):
            continue  # the bisector of the opposite side of a rectangle: the same mirror, the same image
        image = _panel_mirror(box, point, normal, grid)
        if image is not None:
            images.append(image)
            planes.append((point, normal))
    label = np.arange(len(box.centre))
    while True:  # the smallest index reachable by the mirrors labels its class
        new = label
        for image in images:
            new = np.minimum(new, new[image])
        if np.array_equal(new, label):
            break
        label = new
    return np.unique(label, return_inverse=True)


def _box_charges(box):
    """The panels' charges s solving sum_j P_ij s_j = -z_i, folded on the box's mirror symmetry. [1]

    The right-hand side -z and the panels share the footprint's mirror planes, so the charges do too: one
    equation per class of mirror-image panels, with the columns of a class added, gives the same solution
    from a quarter of the matrix for a rectangular building (every panel its own class for an asymmetric one).
    """
    reps, cls = _mirror_classes(box)
    order = np.argsort(cls, kind="stable")
    # the panels taken in the order of their classes, so that each class's columns come out side by side
    by_class = box._replace(**{name: getattr(box, name)[order] for name in ("centre", "axis_u", "axis_v", "half_u",
                                                                              "half_v")})
    rows = _panels_potential(box.centre[reps], by_class, keep=False)  # read once, just below
    folded = np.add.reduceat(rows, np.searchsorted(cls[order], np.arange(len(reps))), axis=1)
    return np.linalg.solve(folded, -box.centre[reps, 2])[cls]


def box_screen(body: BuildingBody, target_panels: int = BOX_TARGET_PANELS) -> BoxScreen:
    """The static screening of the building as a grounded box on the grounded plane in a uniform vertical field.

    Parameters
    ----------
    body : BuildingBody
        The building (footprint polygon and roof height).
    target_panels : int, optional
        About how many panels to cover its walls and roof with. [1]

    Returns
    -------
    BoxScreen
        The panels' charges; ``field_height(points)`` gives phi / E0 anywhere. Solved once per building and
        footprint and kept (the report, its what-ifs and the layout search share it).

    Notes
    -----
    Method of moments for electrostatics [1]: the walls and roof are cut
    into rectangles of uniform charge density sigma_j, each with its image
    in the ground (-sigma_j at the mirror position), and the total potential
    -- the incident E0 z plus the charges' -- is set to zero at every
    panel's centre::

        sum_j P_ij s_j = -z_i,   P_ij = I_j(r_i) - I_j'(r_i),   s_j = sigma_j / (4 pi eps0 E0)

    with I the integral of 1/R over the panel
    (:func:`rectangle_potential_integral`; a point charge past five
    half-diagonals). Then phi(r) / E0 = z + sum_j P(r, j) s_j. The panels
    are graded towards the roof edge and the corners, where the charge
    crowds; the roof grid is aligned with the footprint's longest edge (exact
    for a rectangle, the cells whose centre is over the roof otherwise). A
    very long box gives the two-dimensional map of :func:`facade_field_height`
    at its middle; far away phi -> z.

    References
    ----------
    .. [1] R. F. Harrington, *Field Computation by Moment Methods*, Macmillan,
       1968, ch. 2 (the charged conducting plate and box). (from memory)

    Examples
    --------
    >>> tower = BuildingBody([[0, -15], [15, -15], [15, 0], [0, 0]], 20.0, "steel frame")
    >>> screen = box_screen(tower)
    >>> round(float(screen.field_height([7.5, 1e4, 10.0])), 3)
    10.0
    >>> float(screen.field_height([7.5, -7.5, 10.0]))
    0.0
    """
    key = (body.footprint.tobytes(), float(body.height_m), int(target_panels))
    found = _BOX_SCREENS.get(key)
    if found is not None:
        return found
    centre, au, av, hu, hv = _box_panels(body, int(target_panels))
    box = BoxScreen(centre, au, av, hu, hv, np.zeros(len(centre)), float(body.height_m), body.footprint.copy())
    screen = box._replace(charge=_box_charges(box))
    if len(_BOX_SCREENS) >= 16:
        _BOX_SCREENS.pop(next(iter(_BOX_SCREENS)))
    _BOX_SCREENS[key] = screen
    return screen


__all__ = [
    "length_over_roof", "facade_for_wires",
    "BuildingBody", "SHIELDING_BY_CONSTRUCTION", "facade_field_height", "facade_static_figures", "nearest_facade",
    "plan_distance", "MAX_ELECTRICAL_HEIGHT_RAD", "footprint_area",
    "roof_equivalent_radius",
    "roof_loading_length", "induced_charge_factor", "building_limit_frequency", "building_charge_factor",
    "dynamic_field_height", "scale_screened_field", "screened_field_height", "box_screen", "BoxScreen",
    "rectangle_potential_integral", "BOX_TARGET_PANELS", "building_grid", "grid_wire_radius", "GRID_MESH_WAVELENGTHS",
]


#: Finest and coarsest grid mesh the full-wave building model uses. [m]
GRID_MESH_LIMITS_M = (0.5, 20.0)
#: Grid mesh as a fraction of the shortest wavelength (at most lambda/10, common practice). [1]
GRID_MESH_WAVELENGTHS = 0.1


def grid_wire_radius(mesh):
    """Radius of the wires of a square wire grid standing for a solid conducting surface.

    Parameters
    ----------
    mesh : array_like
        Grid spacing. [m]

    Returns
    -------
    ndarray
        a = mesh / (4 pi). [m]

    Notes
    -----
    The equal-area rule: the wires' surface area equals the area of the
    surface they stand for. A square cell of side m holds two wires of
    length m, so 2 pi a (2 m) = m^2.

    References
    ----------
    A. C. Ludwig, "Wire grid modeling of surfaces", IEEE Trans. Antennas
    Propag. 35(9), 1045-1048, 1987. (from memory)

    Examples
    --------
    >>> round(float(grid_wire_radius(3.0)), 4)
    0.2387
    """
    return np.asarray(mesh, dtype=float) / (4.0 * np.pi)


def _perimeter_points(footprint, mesh):
    """Points around the footprint, every corner included, no gap longer than ``mesh``."""
    a = np.asarray(footprint, dtype=float)
    b = np.roll(a, -1, axis=0)
    pts = []
    for p, q in zip(a, b):
        n = max(int(np.ceil(np.linalg.norm(q - p) / mesh - 1e-9)), 1)
        t = np.arange(n)[:, None] / n
        pts.append(p + t * (q - p))
    return np.vstack(pts)


def _roof_lines(footprint, mesh, height):
    """Roof grid: lines along x and y across the footprint, cut at every crossing. (start, end) arrays."""
    import shapely
    from shapely.geometry import LineString, Polygon

    poly = Polygon(footprint)
    x0, y0, x1, y1 = poly.bounds
    xs = x0 + (x1 - x0) * np.arange(1, max(int(np.ceil((x1 - x0) / mesh - 1e-9)), 1)) / max(
        int(np.ceil((x1 - x0) / mesh - 1e-9)), 1)
    ys = y0 + (y1 - y0) * np.arange(1, max(int(np.ceil((y1 - y0) / mesh - 1e-9)), 1)) / max(
        int(np.ceil((y1 - y0) / mesh - 1e-9)), 1)
    starts, ends = [], []
    for axis, values, cuts in ((0, xs, ys), (1, ys, xs)):
        for v in values:
            line = LineString([(v, y0 - 1), (v, y1 + 1)] if axis == 0 else [(x0 - 1, v), (x1 + 1, v)])
            inside = shapely.intersection(line, poly)
            parts = getattr(inside, "geoms", [inside])
            for part in parts:
                if part.is_empty or part.length <= 0:
                    continue
                c = np.asarray(part.coords)
                lo, hi = sorted([c[0, 1 - axis], c[-1, 1 - axis]])
                knots = np.concatenate([[lo], cuts[(cuts > lo + 1e-6) & (cuts < hi - 1e-6)], [hi]])
                for u, w in zip(knots[:-1], knots[1:]):
                    s = [v, u] if axis == 0 else [u, v]
                    e = [v, w] if axis == 0 else [w, v]
                    starts.append([s[0], s[1], height])
                    ends.append([e[0], e[1], height])
    return np.array(starts).reshape(-1, 3), np.array(ends).reshape(-1, 3)


def building_grid(body: BuildingBody, mesh: float):
    """The building as a grounded box of wires: walls and roof, for the method-of-moments solver.

    Parameters
    ----------
    body : BuildingBody
        The building.
    mesh : float
        Grid spacing. [m]

    Returns
    -------
    start, end : ndarray, shape (N, 3)
        Grid wire end points; the walls' vertical wires stand on the ground
        (z = 0), the roof's wires meet the top ring where they end on it. [m]
    radius : float
        Grid-wire radius by the equal-area rule (:func:`grid_wire_radius`). [m]

    Examples
    --------
    >>> s, e, a = building_grid(BuildingBody([[0, 0], [6, 0], [6, 3], [0, 3]], 3.0, "steel frame"), 3.0)
    >>> len(s), round(a, 3)
    (13, 0.239)
    """
    mesh = float(mesh)
    if not GRID_MESH_LIMITS_M[0] <= mesh <= GRID_MESH_LIMITS_M[1]:
        raise ModelInputError(f"grid mesh {mesh!r} m is outside {GRID_MESH_LIMITS_M[0]}-{GRID_MESH_LIMITS_M[1]} m")
    ring = _perimeter_points(body.footprint, mesh)
    rs, re = _roof_lines(body.footprint, mesh, body.height_m)
    # the roof lines end on the top ring: add their ends to it, in order along the edge
    nz = max(int(np.ceil(body.height_m / mesh - 1e-9)), 1)
    levels = body.height_m * np.arange(nz + 1) / nz
    starts, ends = [], []
    n = len(ring)
    for k in range(nz):
        starts.append(np.column_stack([ring, np.full(n, levels[k])]))
        ends.append(np.column_stack([ring, np.full(n, levels[k + 1])]))
    for k in range(1, nz):
        starts.append(np.column_stack([ring, np.full(n, levels[k])]))
        ends.append(np.column_stack([np.roll(ring, -1, axis=0), np.full(n, levels[k])]))
    top = _ring_with(ring, np.vstack([rs, re])[:, :2] if len(rs) else np.zeros((0, 2)))
    starts.append(np.column_stack([top, np.full(len(top), body.height_m)]))
    ends.append(np.column_stack([np.roll(top, -1, axis=0), np.full(len(top), body.height_m)]))
    starts.append(rs)
    ends.append(re)
    return np.vstack(starts), np.vstack(ends), float(grid_wire_radius(mesh))


def _ring_with(ring, extra):
    """The ring's points with ``extra`` points (lying on its edges) inserted in order."""
    out = []
    n = len(ring)
    for i in range(n):
        p, q = ring[i], ring[(i + 1) % n]
        d = q - p
        length2 = float(np.dot(d, d))
        out.append(p)
        if len(extra) == 0:
            continue
        t = (extra - p) @ d / length2
        off = np.linalg.norm(p + t[:, None] * d - extra, axis=1)
        on = (t > 1e-6) & (t < 1 - 1e-6) & (off < 1e-6)
        for tt in sorted_unique(np.round(t[on], 9)):
            out.append(p + tt * d)
    return np.array(out)
