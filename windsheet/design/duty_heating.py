"""The duty's current and the winding's temperatures: only from what the order gives.

A current is never assumed.  It is the order's ``duty.current``; on a pulse
duty it follows from the repetition rate and the pulse's width (the RL
transient of :mod:`windsheet.physics.pulse_duty`) or its energy.  Without
either, nothing is heated: the thermal section says what is missing and
gives no verdict and no temperature.  A heat balance that runs away gives no
temperature either, only the runaway.
"""

from __future__ import annotations

import math

import numpy as np

from windsheet.design import sizing
from windsheet.order.document import Order, ToroidForm
from windsheet.physics import heating, pulse_duty
from windsheet.physics.ac_resistance import winding_ac_ratio
from windsheet.physics.wire import dc_resistance

BASIS_GIVEN = "given"
BASIS_WIDTH = "pulse width and repetition rate"
BASIS_ENERGY = "pulse energy and repetition rate"
BASIS_VOLTAGE = "duty voltage across the winding"


def outer_surface(order: Order, layout):
    """The winding's outer surface, which sheds its heat [m²], and its characteristic length [m]."""
    f = order.doc.form
    b = float(layout.build_height)
    if isinstance(f, ToroidForm):
        od, hole, h = f.outer_diameter + 2 * b, max(f.inner_diameter - 2 * b, 0.0), f.height + 2 * b
        return math.pi * (od + hole) * h + math.pi / 2 * (od ** 2 - hole ** 2), od
    # The outer layer's turn, out to its surface, along the traverse; the winding's ends lie
    # against flanges or the form and are not counted (errs hot).
    perimeter = float(np.max(layout.turn_length)) + math.pi * layout.overall_diameter
    return perimeter * float(layout.traverse_used), perimeter / math.pi


def resistivity(wire, temperature_C):
    """The conductor's resistivity at ``temperature_C``. [ohm·m]"""
    d = wire.copper_diameter
    return float(dc_resistance(1.0, d, temperature_C, conductor=wire.conductor)) * math.pi * d * d / 4


def ac_ratio(order: Order, wire, layout, temperature_C):
    """AC/DC resistance of the winding at the duty frequency (:func:`winding_ac_ratio`)."""
    return winding_ac_ratio(order.doc.duty.frequency, wire.copper_diameter, resistivity(wire, temperature_C),
                            layout.radial_layers, layout.pitch / layout.strands)


class DutyCurrent:
    """The terminal current the duty drives, as a function of the winding's temperature.

    ``basis`` names where it comes from (``None``: the order gives nothing it
    can be computed from, and ``missing`` says what to give).
    """

    def __init__(self, order: Order, wire, length, L, inductance_H):
        self.order, self.wire, self.length, self.L = order, wire, length, L
        duty = order.doc.duty
        self.basis, self.missing = None, None
        self.energy_per_pulse = None
        if duty.current > 0:
            self.basis = BASIS_GIVEN
        elif duty.voltage_driven:
            self.basis = BASIS_VOLTAGE
        elif duty.waveform == "pulse":
            have_rate = duty.repetition_rate is not None
            if have_rate and duty.pulse_energy is not None:
                self.basis, self.energy_per_pulse = BASIS_ENERGY, duty.pulse_energy
            elif have_rate and duty.pulse_width is not None:
                r20 = self.terminal_resistance(20.0)
                if pulse_duty.decays_between_pulses(r20, inductance_H, duty.pulse_width, duty.repetition_rate):
                    self.basis = BASIS_WIDTH
                else:
                    tau = inductance_H / r20
                    self.missing = (f"the current does not die away between pulses (L/R = {_seconds(tau)}, "
                                    f"period {_seconds(1.0 / duty.repetition_rate)}), so each pulse does not "
                                    "start from zero: give the duty's rms current (duty.current)")
            else:
                need = [] if have_rate else ["repetition rate (duty.repetition_rate)"]
                if duty.pulse_width is None and duty.pulse_energy is None:
                    need.append("width (duty.pulse_width) or the energy each pulse leaves in the winding "
                                "(duty.pulse_energy)")
                self.missing = "the pulse's " + " and its ".join(need) + ", or the duty's rms current (duty.current)"
        else:
            self.missing = ("the duty current (duty.current), or current: voltage-driven when the winding sits "
                            "across the duty voltage")
        self.inductance_H = inductance_H

    def terminal_resistance(self, temperature_C) -> float:
        r = dc_resistance(self.length, self.wire.copper_diameter, temperature_C, conductor=self.wire.conductor)
        return sizing.network_at(self.order, self.L, r, self.order.doc.test.frequency).resistance

    def terminal(self, temperature_C) -> float | None:
        """rms (or d.c.) terminal current at this winding temperature. [A]"""
        duty = self.order.doc.duty
        if self.basis == BASIS_GIVEN:
            return duty.current
        if self.basis == BASIS_VOLTAGE:
            # The winding across the duty voltage: the voltage over its impedance at this temperature.
            r = dc_resistance(self.length, self.wire.copper_diameter, temperature_C, conductor=self.wire.conductor)
            net = sizing.network_at(self.order, self.L, r, duty.frequency)
            z = abs(complex(net.resistance, 2 * math.pi * duty.frequency * net.inductance))
            return duty.voltage / z if z > 0 else 0.0
        if self.basis == BASIS_WIDTH:
            return pulse_duty.pulse_rms_current(duty.voltage_peak, self.terminal_resistance(temperature_C),
                                                self.inductance_H, duty.pulse_width, duty.repetition_rate)
        if self.basis == BASIS_ENERGY:
            # The rms current that leaves the same energy in the copper.
            return math.sqrt(self.energy_per_pulse * duty.repetition_rate / self.terminal_resistance(temperature_C))
        return None


def winding_heat(order: Order, wire, layout, length, L, current: DutyCurrent):
    """Temperatures on the duty (:mod:`windsheet.physics.heating`), the loss rising with them; None without a current."""
    if current.basis is None:
        return None
    duty = order.doc.duty

    def loss_at(t):
        if current.basis == BASIS_ENERGY:
            return current.energy_per_pulse * duty.repetition_rate
        r = dc_resistance(length, wire.copper_diameter, t, conductor=wire.conductor)
        i = np.abs(sizing.network_at(order, L, r, duty.frequency).strand_current) * current.terminal(t)
        return float(np.sum(i ** 2 * r)) * ac_ratio(order, wire, layout, t)["ratio"]

    area, size = outer_surface(order, layout)
    temps = heating.winding_temperatures(loss_at, area, size, float(layout.build_height), duty.ambient)
    return {**temps, "surface_area_m2": area, "characteristic_length_m": size}


def thermal_section(temps, wire, strand_i, order_t, missing=None):
    """The thermal report: temperatures (none when not computed or run away), the verdict, current density."""
    lo, hi = heating.CURRENT_DENSITY_RANGE_A_PER_MM2
    common = {"method": heating.METHOD, "emissivity": heating.EMISSIVITY,
              "winding_conductivity_W_per_mK": heating.WINDING_CONDUCTIVITY,
              "thermal_class_C": wire.thermal_class, "operating_temperature_given_C": order_t,
              "current_density_range_A_per_mm2": [lo, hi],
              "current_density_basis": "common practice for naturally cooled small windings (memory)"}
    if temps is None:
        return {**common, "verdict": "unknown", "converged": None, "missing": missing,
                "reason": f"Not computed: no current to heat the winding. Give {missing}."}
    verdict, reason = heating.thermal_verdict(temps["hot_spot_C"], wire.thermal_class,
                                              converged=temps["converged"])
    j = [float(heating.current_density(i, wire.copper_diameter)) for i in strand_i]
    out = {**temps, **common, "verdict": verdict, "reason": reason,
           "current_density_A_per_mm2": max(j) if j else None}
    if not temps["converged"]:
        # No steady state: the temperatures at the cut-off are not the winding's.
        out.update(surface_rise_K=None, surface_rise_basis=None, surface_C=None, hot_spot_C=None, mean_C=None, loss_W=None)
    return out


def _seconds(t: float) -> str:
    for scale, unit in ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns")):
        if t >= scale:
            return f"{t / scale:.3g} {unit}"
    return f"{t:.3g} s"
