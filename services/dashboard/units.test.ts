import { describe, expect, it } from 'vitest';
import { metricInfo, tableUnits, unitFromName } from './units.js';

describe('units of the quantities shown', () => {
  it('the unit-suffix rule agrees with every unit the record-type table gives (counts aside)', () => {
    // Dimensionless counts and fractions carry no suffix by design.
    const counts = new Set(['bins_used', 'flag', 'coverage', 'gap_filled', 'value', 'limit']);
    const checked = tableUnits().filter(([, f]) => !counts.has(f));
    expect(checked.length).toBeGreaterThan(45);
    for (const [type, field, unit] of checked) expect(unitFromName(field), `${type}.${field}`).toBe(unit);
  });

  it('gives raw message fields a unit and words (the metrics user rules name)', () => {
    expect(metricInfo('ctd.temp_c')).toEqual({ unit: 'degree_Celsius', label: 'water temperature' });
    expect(metricInfo('met.wind_m_s')).toEqual({ unit: 'm s-1', label: 'wind speed' });
    expect(metricInfo('pco2.battery_v')).toEqual({ unit: 'V', label: 'supply voltage' });
    expect(metricInfo('ctd.sal')).toEqual({ unit: '1', label: 'practical salinity' });
    expect(metricInfo('oxygen.o2_mg_l')).toEqual({ unit: 'mg L-1', label: 'dissolved oxygen' });
    expect(metricInfo('carbonate.omega_ar')).toEqual({ unit: '1', label: 'aragonite saturation state' });
  });
});
