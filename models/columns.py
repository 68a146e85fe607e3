"""Names, units and meanings of the columns of the table that ``models.evaluate`` returns.

Objectives and constraints of a study are chosen from these names, so a new model output
becomes optimisable by adding it here and in ``evaluate``. Every dimensional column carries
its SI unit in its name. Per-source columns repeat for every heat source ``<s>`` (its name).
"""

from __future__ import annotations

COLUMNS: dict[str, str] = {
    # the design, echoed
    "fin_count": "number of fins (-)",
    "fin_thickness_root_m": "fin thickness at the base (m)",
    "fin_thickness_tip_m": "fin thickness at the tip (m)",
    "fin_height_m": "fin height above the base (m)",
    "base_thickness_m": "base plate thickness (m)",
    "base_width_m": "base width across the flow (m)",
    "flow_length_m": "base length along the flow (m)",
    "fan_index": "index of the fan set-up in the study's candidate list (-)",
    # geometry
    "pitch_m": "fin pitch, centre to centre (m)",
    "gap_root_m": "gap between fins at the base (m)",
    "gap_tip_m": "gap between fins at the tips (m)",
    "gap_mean_m": "mean gap between fins (m)",
    "fin_height_to_gap_ratio": "fin height / root gap, the extruder's tongue ratio (-)",
    "hydraulic_diameter_m": "hydraulic diameter of one fin channel (m)",
    "channel_aspect_ratio": "short side / long side of one channel (-)",
    "free_flow_ratio": "free-flow area / frontal area of the finned region, sigma (-)",
    "fin_area_m2": "wetted area of all fins (m2)",
    "total_area_m2": "wetted area of fins and exposed base (m2)",
    "cross_section_area_m2": "area of the extrusion profile, fillets included (m2)",
    "overall_height_m": "base thickness + fin height (m)",
    "mass_kg": "mass of the extrusion (kg)",
    # air flow
    "flow_m3_per_s": "volumetric air flow delivered to the sink, bypass included (m3/s)",
    "channel_flow_m3_per_s": "volumetric air flow through the fin channels (m3/s)",
    "bypass_fraction": "share of the flow that passes around the fins (-)",
    "approach_velocity_m_per_s": "duct air velocity ahead of the sink, clearances included (m/s)",
    "channel_velocity_m_per_s": "mean air velocity in the fin channels (m/s)",
    "reynolds_number": "channel Reynolds number on the hydraulic diameter (-)",
    "pressure_drop_Pa": "static pressure drop across the sink: entrance + friction + exit (Pa)",
    "system_pressure_Pa": "sink pressure drop + extra system impedance = fan pressure (Pa)",
    "fan_air_power_W": "air power delivered by the fans, flow x system pressure (W)",
    # heat transfer
    "h_W_per_m2K": "mean heat transfer coefficient on the wetted area (W/m2K)",
    "nusselt_number": "mean channel Nusselt number on the hydraulic diameter (-)",
    "fin_efficiency": "fin efficiency (-)",
    "surface_efficiency": "overall surface efficiency of fins and base (-)",
    "fin_biot_number": "h (t_root/2) / k of the fins (-)",
    "ntu": "number of transfer units of the sink as a heat exchanger (-)",
    "sink_resistance_K_per_W": "isothermal base to inlet air, air heating included (K/W)",
    "base_resistance_K_per_W": "1-D conduction through the base thickness (K/W)",
    "spreading_resistance_K_per_W": (
        "hottest source's rise per watt less the 1-D base and sink parts: its spreading "
        "resistance, plus with several sources the heating by the others (K/W)"
    ),
    "interface_resistance_K_per_W": "interface material of the hottest source (K/W)",
    "total_resistance_K_per_W": "junction of the hottest source to inlet air / total power (K/W)",
    "air_temperature_rise_K": "mixed outlet (fins + bypass) minus inlet air temperature (K)",
    "outlet_temperature_K": "mixed mean outlet air temperature, fins + bypass (K)",
    "base_temperature_K": "highest source-footprint temperature on the base (K)",
    "junction_temperature_K": "highest junction temperature (K)",
    "junction_margin_K": "smallest (limit - junction temperature) over the sources (K)",
    # validity
    "operating_point_found": "the fan and system curves meet (bool)",
    "in_fan_data": "operating point inside the fan curve's data (bool)",
    "in_range_flow": "air, channel and bypass flow inside the correlations' ranges (bool)",
    "in_range_fin": "1-D fin theory valid (fin Biot number small) (bool)",
    "geometry_valid": "the profile can be made (bool)",
    "valid": "buildable, flow solved, sources on the base, numbers finite (bool)",
    "reason": "why a design is flagged, empty when valid (text)",
}

PER_SOURCE: dict[str, str] = {
    "junction_temperature_{s}_K": "junction temperature of source {s} (K)",
    "junction_margin_{s}_K": "limit minus junction temperature of source {s} (K)",
    "base_temperature_{s}_K": "mean base temperature under source {s} (K)",
}
