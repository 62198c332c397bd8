"""The insulation verdict: will the turn, layer and lead insulation stand the duty?

Pure functions.  The verdict weighs three things for the pairs of
neighbouring conductors: the enamel's published breakdown (derated), the
layer tape's rating, and partial discharge, judged pair by pair against the
inception voltage that pair's construction gives
(:mod:`windsheet.physics.discharge`), or the shop's measured value.  What would
change a failing verdict is found elsewhere, by re-running the whole check
with each change to the order (:mod:`windsheet.design.remedies`).
"""

from __future__ import annotations

import math

from .discharge import paschen_minimum

#: Working fraction of the wire's published minimum breakdown voltage
#: (common practice: a safety factor of 4, memory).
DERATING = 0.25
#: PDIV falls 20–30 % at running temperature (memory): air density falls and
#: the enamel's permittivity rises.  A flat factor, used only when no hot
#: inception voltage is computed (:func:`insulation_verdict` alone).
PDIV_HOT_FACTOR = 0.75
#: Margin taken off the hot inception voltage beyond the fall of the air's
#: density (which is computed, Paschen): the enamel's permittivity rising with
#: temperature and humidity (memory: polyamide-imide and polyester-imide εr
#: rise some 10 % from 20 °C to 155 °C).  15 %, unless the order says.
PDIV_HOT_MARGIN = 0.15
#: Margin kept below the hot inception voltage on AC duty: IEC 60034-18-41's
#: safety factor of 1.25 on the PDIV of type I (PD-free) insulation (memory).
PD_SAFETY_FACTOR = 1.25
#: Hipot test duration (common practice, 1 min).
HIPOT_DURATION_S = 60.0
HIPOT_BASIS = "2U + 1000 V for 1 min (common practice; the applicable standard governs)"


def volts(v) -> str:
    """A voltage to 3 significant figures, never in exponent form: 4.37, 163, 1150.

    Parameters
    ----------
    v : float
        The voltage, in whatever measure the text states (peak, rms). [V]

    Returns
    -------
    text : str
        ``v`` rounded to 3 significant figures, in plain decimal notation; 0,
        inf and nan as Python writes them with no decimals. [V]

    References
    ----------
    Rounding to significant figures, common practice.

    Examples
    --------
    >>> volts(4.3712), volts(1149.9)                 # 3 significant figures
    ('4.37', '1150')
    >>> volts(230 * math.sqrt(2))                    # 230 V rms is 325.27 V peak
    '325'
    """
    v = float(v)
    if v == 0 or not math.isfinite(v):
        return f"{v:.0f}"
    r = round(v, 2 - math.floor(math.log10(abs(v))))
    return f"{r:.{max(0, 2 - math.floor(math.log10(abs(r))))}f}"


def insulation_verdict(worst_Vpk, breakdown_V, *, derating=DERATING, enamel_Vpk=None, layer_Vpk=0.0,
                       tape_rating_V=None, pd_Vpk=None, pdiv_Vpk=math.inf,
                       pdiv_hot_factor=PDIV_HOT_FACTOR, pd_where=None, pdiv_basis="estimated",
                       ac=True, impregnation="none", safety_factor=PD_SAFETY_FACTOR, worst_where=None,
                       enamel_where=None, layer_where=None, pdiv_hot_Vpk=None, hot_text=None) -> dict:
    """Judge turn, layer and lead insulation: pass, marginal or fail.

    Policy
    ------
    * **fail** — a pair held by enamel alone is over ``derating × breakdown``;
      the layer-to-layer peak is over the tape's rating; on AC duty, the pair
      nearest partial discharge is over its hot inception voltage (discharge
      would then run every cycle and erode ordinary enamel).
    * **marginal** — not a fail, but on AC duty that pair is within
      ``safety_factor`` of its hot inception voltage; on DC duty it is above
      it (steady DC does not sustain discharge, switching surges may).
    * **pass** — otherwise.

    The wire's published breakdown (a minimum on straight new wire, by
    twisted-pair test) is compared with the peak working voltage as it
    stands; if the published figure is an rms test value, this is
    conservative by up to √2.

    Parameters
    ----------
    worst_Vpk : float
        Worst peak voltage between any neighbouring conductors. [V]
    breakdown_V : float
        Wire's published minimum breakdown voltage. [V]
    derating : float
        Fraction of the breakdown allowed in service. [-]
    enamel_Vpk : float or None
        Worst peak over the pairs insulated by enamel alone: touching
        conductors, no air and no rated tape between them (a spaced or
        diagonal pair has air between); ``worst_Vpk`` by default. [V]
    layer_Vpk : float
        Worst peak voltage across the layer tape. [V]
    tape_rating_V : float or None
        Rated voltage of the layer tape; ``None`` skips that check. [V]
    pd_Vpk : float or None
        Peak voltage of the pair nearest partial discharge (highest voltage
        over its own inception voltage); ``worst_Vpk`` by default. [V]
    pdiv_Vpk : float
        That pair's inception voltage at 20 °C (``inf``: no air path). [V]
    pdiv_hot_factor : float
        PDIV at running temperature over PDIV at 20 °C, when ``pdiv_hot_Vpk``
        is not given. [-]
    pdiv_hot_Vpk : float or None
        That pair's hot inception voltage, computed (the air's density at the
        hot spot, and a margin). [V]
    hot_text : str or None
        How the hot value was reached, for the reason text.
    pd_where : str or None
        Where that pair is, in words.
    pdiv_basis : str
        ``"estimated"`` (from the construction), ``"measured"`` (the
        order's ``insulation.pdiv``) or ``"no air path"``.
    ac : bool
        AC duty (``False`` for DC).
    impregnation : str
        ``"none"``, ``"varnish"`` or ``"potted"``.
    safety_factor : float
        Margin kept below the hot inception voltage on AC. [-]
    worst_where, enamel_where, layer_where : str or None
        Where the worst pair, the worst pair across enamel alone and the
        worst pair across the layer tape are, in words.  Each reason states
        the quantity it judged, where it is, and that quantity's own limit.

    Returns
    -------
    verdict : dict
        ``verdict``, ``reasons`` (text), and every number behind it.

    References
    ----------
    Derating to a quarter of breakdown, common practice (memory); PDIV 20–30 %
    lower hot (memory); safety factor 1.25, IEC 60034-18-41 (memory);
    inception voltages per :func:`windsheet.physics.discharge.inception_voltage`.

    Examples
    --------
    >>> insulation_verdict(450.0, 4600.0, pdiv_Vpk=700.0)["verdict"]      # hot PDIV 525 V
    'marginal'
    >>> insulation_verdict(600.0, 4600.0, pdiv_Vpk=700.0)["verdict"]
    'fail'
    >>> insulation_verdict(600.0, 4600.0, pdiv_Vpk=700.0, ac=False)["verdict"]
    'marginal'
    """
    allowed = derating * breakdown_V
    enamel = worst_Vpk if enamel_Vpk is None else enamel_Vpk
    pd_v = worst_Vpk if pd_Vpk is None else pd_Vpk
    pdiv_hot = pdiv_Vpk * pdiv_hot_factor if pdiv_hot_Vpk is None else float(pdiv_hot_Vpk)
    place = f" ({pd_where})" if pd_where else ""
    basis = {"estimated": "estimated from the construction", "measured": "from the measured PDIV",
             "no air path": "none: no air path"}.get(pdiv_basis, pdiv_basis)
    at = lambda where: f" ({where})" if where else ""  # noqa: E731
    limit = f"{volts(allowed)} V peak ({derating:.0%} of the wire's {volts(breakdown_V)} V breakdown)"
    fails, marginals, notes = [], [], []
    if enamel > allowed:
        fails.append(f"Worst voltage across enamel alone, {volts(enamel)} V peak{at(enamel_where)}, is over "
                     f"the enamel's allowed {limit}.")
    if tape_rating_V is not None and layer_Vpk > tape_rating_V:
        fails.append(f"Worst voltage across the layer tape, {volts(layer_Vpk)} V peak{at(layer_where)}, is "
                     f"over the tape's {volts(tape_rating_V)} V rating.")
    if math.isfinite(pdiv_hot) and pd_v > pdiv_hot:
        how = (f"{volts(pdiv_Vpk)} V at 20 °C, {basis}, less {1 - pdiv_hot_factor:.0%}" if hot_text is None
               else f"{volts(pdiv_Vpk)} V {hot_text}")
        text = (f"{volts(pd_v)} V peak{place} is over that pair's hot partial-discharge inception "
                f"voltage {volts(pdiv_hot)} V peak ({how})")
        if ac:
            fails.append(text + ": discharges every cycle will eat the enamel over time.")
        else:
            marginals.append(text + ": steady DC will not sustain discharge, but switch-on and "
                             "switch-off surges may.")
    elif ac and math.isfinite(pdiv_hot) and pd_v * safety_factor > pdiv_hot:
        marginals.append(f"{volts(pd_v)} V peak{place} is within the safety factor {safety_factor:g} of "
                         f"that pair's hot partial-discharge inception voltage {volts(pdiv_hot)} V peak "
                         f"({volts(pdiv_Vpk)} V " + (f"at 20 °C, {basis}" if hot_text is None else hot_text)
                         + ").")
    if impregnation == "potted":
        notes.append("Potted: no air lies between the conductors, so no partial discharge by Paschen's "
                     "law; the enamel's derated breakdown governs, and a void-free potting, which only a "
                     "partial-discharge test of finished parts can show.")
    if fails:
        verdict, reasons = "fail", fails
    elif marginals:
        verdict, reasons = "marginal", marginals
    else:
        verdict = "pass"
        pd_text = ("no pair can start partial discharge" if not math.isfinite(pdiv_hot) else
                   f"the pair nearest partial discharge, {volts(pd_v)} V peak{place}, is below "
                   f"{volts(pdiv_hot / safety_factor)} V peak (its hot inception voltage "
                   f"{volts(pdiv_hot)} V over {safety_factor:g}; {volts(pdiv_Vpk)} V "
                   + (f"at 20 °C, {basis}" if hot_text is None else hot_text) + ")")
        reasons = [f"Worst voltage across enamel alone, {volts(enamel)} V peak{at(enamel_where)}, is within "
                   f"the enamel's allowed {limit}." if enamel > 0 else
                   "No pair of conductors is held by enamel alone."]
        if tape_rating_V is not None and layer_Vpk > 0:
            reasons.append(f"Worst voltage across the layer tape, {volts(layer_Vpk)} V peak{at(layer_where)}, "
                           f"is within the tape's {volts(tape_rating_V)} V rating.")
        across_tape = tape_rating_V is not None and worst_Vpk <= layer_Vpk * (1 + 1e-9)
        if worst_Vpk > enamel * (1 + 1e-9) and not across_tape:
            reasons.append(f"The worst pair of all, {volts(worst_Vpk)} V peak{at(worst_where)}, has air as "
                           "well as enamel between its conductors: it is judged by its own partial-discharge "
                           "inception voltage, not the enamel's breakdown.")
        reasons.append(pd_text[0].upper() + pd_text[1:] + ".")
    return {
        "verdict": verdict,
        "reasons": reasons + notes,
        "worst_adjacent_Vpk": float(worst_Vpk),
        "enamel_Vpk": float(enamel),
        "breakdown_V": float(breakdown_V),
        "derating": float(derating),
        "allowed_Vpk": float(allowed),
        "margin": float(allowed / enamel) if enamel > 0 else None,
        "paschen_min_Vpk": float(paschen_minimum()[1]),
        "pdiv_Vpk": float(pdiv_Vpk) if math.isfinite(pdiv_Vpk) else None,
        "pdiv_hot_Vpk": float(pdiv_hot) if math.isfinite(pdiv_hot) else None,
        "pdiv_basis": pdiv_basis,
        "pd_pair": {"where": pd_where, "voltage_Vpk": float(pd_v)},
        "pd_safety_factor": float(safety_factor),
        "layer_Vpk": float(layer_Vpk),
        "tape_rating_V": None if tape_rating_V is None else float(tape_rating_V),
        "impregnation": impregnation,
        "duty": "ac" if ac else "dc",
    }


def hipot_voltage(rated_V):
    """Suggested dielectric (hipot) test voltage, winding to core/frame.

    Parameters
    ----------
    rated_V : float
        Rated working voltage, rms (or the DC value). [V]

    Returns
    -------
    U_test : float
        ``2U + 1000``, applied for 1 min. [V rms]

    References
    ----------
    Common practice in the style of IEC 60034-1 (memory).  A labelled
    default only: the applicable product standard, local codes and licensed
    practice govern the test voltage, duration and safety.

    Examples
    --------
    >>> hipot_voltage(230.0)
    1460.0
    """
    return 2.0 * abs(float(rated_V)) + 1000.0
