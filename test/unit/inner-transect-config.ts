// The fictional reef's inner transect alone (flat to back reef, the weather mast), with a bottle sampler
// at both ends: the site of the late-lab-result and calibration tests.
export const LATE_CONFIG = `site: ornen-reef
reef_axis_deg: 270
latitude_deg: 8.01
stations:
  flat:
    position: { lat: 8.0100, lon: -144.9306 }
    sensors:
      p-flat: { kind: pressure, height_m: 0.15 }
      adcp-flat: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-flat: { kind: ctd }
      o2-flat: { kind: oxygen }
      co2-flat: { kind: pco2 }
      bottle-flat: { kind: sample }
  back:
    position: { lat: 8.0100, lon: -144.9322 }
    sensors:
      p-back: { kind: pressure, height_m: 0.15 }
      adcp-back: { kind: adcp, height_m: 0.30, beam_angle_deg: 25, orientation: up, declination_deg: 10.5 }
      ctd-back: { kind: ctd }
      o2-back: { kind: oxygen }
      co2-back: { kind: pco2 }
      bottle-back: { kind: sample }
  mast:
    position: { lat: 8.0105, lon: -144.9330 }
    sensors:
      met: { kind: met, wind_height_m: 6 }
transects:
  inner:
    upstream: flat
    downstream: back
    length_m: 170
    current: back
`;
