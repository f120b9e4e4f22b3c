import { describe, expect, it } from 'vitest';
import { captureIo } from '../testing.js';
import { run } from './carbonate.js';

describe('reefd carbonate', () => {
  it('--json prints one object with the contract carbonate fields (TA 2300 + pCO2 400 at S 35, t 25: pH 8.0426, PyCO2SYS 1.8.3.4)', async () => {
    const io = captureIo();
    const code = await run(['--sal', '35', '--temp', '25', '--ta', '2300', '--pco2', '400', '--json'], io);
    expect(code).toBe(0);
    const { stdout, stderr } = io.text();
    expect(stderr).toBe('');
    expect(stdout.trim().split('\n')).toHaveLength(1);
    const o = JSON.parse(stdout) as Record<string, unknown>;
    for (const k of [
      'ta_umol_kg',
      'dic_umol_kg',
      'ph_total',
      'pco2_uatm',
      'co3_umol_kg',
      'omega_ar',
      'omega_ca',
    ]) {
      expect(typeof o[k]).toBe('number');
    }
    expect(o.ta_source).toBe('measured');
    expect(o.ta_umol_kg).toBe(2300);
    expect(o.ph_total as number).toBeCloseTo(8.0426, 4);
    expect(o.dic_umol_kg as number).toBeCloseTo(1998.55, 1);
    expect(o.omega_ar as number).toBeCloseTo(3.361, 3);
    // Orr et al. (2018) constants plus +-5 TA, +-2 uatm: sigma(pH) about 0.007.
    expect(o.ph_total_sigma as number).toBeGreaterThan(0.005);
    expect(o.ph_total_sigma as number).toBeLessThan(0.01);
    expect(o.flag).toBe(1);
  });

  it('ta_source is "salinity" with --ta-s35, and "measured" with ta_calculated when TA follows from two other inputs', async () => {
    const io = captureIo();
    expect(
      await run(['--sal', '34', '--temp', '27', '--ta-s35', '2300', '--pco2', '420', '--json'], io),
    ).toBe(0);
    const a = JSON.parse(io.text().stdout) as Record<string, number | string>;
    expect(a.ta_source).toBe('salinity');
    expect(a.ta_umol_kg).toBeCloseTo((2300 * 34) / 35, 10);
    const io2 = captureIo();
    expect(
      await run(
        ['--sal', '35', '--temp', '25', '--dic', '2000', '--ph', '8.05', '--json', '--no-sigma'],
        io2,
      ),
    ).toBe(0);
    const b = JSON.parse(io2.text().stdout) as Record<string, unknown>;
    // the contract's list is salinity | sample | measured (contract section 4)
    expect(b.ta_source).toBe('measured');
    expect(b.ta_calculated).toBe(true);
    expect(b.ph_total_sigma).toBeUndefined();
  });

  it('prints a table by default', async () => {
    const io = captureIo();
    expect(await run(['--sal', '35', '--temp', '25', '--ta', '2300', '--dic', '2000'], io)).toBe(0);
    const out = io.text().stdout;
    expect(out).toMatch(/^Carbonate system at S 35, t 25 degC, 0 dbar \(flag 1; TA measured\)/);
    expect(out).toMatch(/Omega aragonite\s+\d\.\d{3} \+- \d\.\d{3}/);
    expect(out).toMatch(/pH \(total\)\s+8\.0\d{3}/);
  });

  it('exit 2 with a clear message when not exactly two inputs are given', async () => {
    const io = captureIo();
    expect(await run(['--sal', '35', '--temp', '25', '--ta', '2300'], io)).toBe(2);
    expect(io.text().stderr).toMatch(/exactly two of --ta/);
    const io3 = captureIo();
    expect(
      await run(['--sal', '35', '--temp', '25', '--ta', '2300', '--dic', '2000', '--ph', '8'], io3),
    ).toBe(2);
    expect(io3.text().stderr).toMatch(/got --ta, --dic, --ph/);
  });

  it('exit 2 on non-numeric values, unknown options and unknown constant names', async () => {
    const io = captureIo();
    expect(await run(['--sal', 'abc', '--temp', '25', '--ta', '2300', '--dic', '2000'], io)).toBe(2);
    expect(io.text().stderr).toMatch(/--sal must be a number, got "abc"/);
    const io2 = captureIo();
    expect(await run(['--sal', '35', '--temp', '25', '--tee', '1'], io2)).toBe(2);
    expect(io2.text().stderr).toMatch(/tee/);
    const io3 = captureIo();
    expect(
      await run(
        ['--sal', '35', '--temp', '25', '--ta', '2300', '--dic', '2000', '--carbonic-constants', '10'],
        io3,
      ),
    ).toBe(2);
    expect(io3.text().stderr).toMatch(/lueker2000, dickson-millero1987/);
    const io4 = captureIo();
    expect(
      await run(
        ['--sal', '35', '--temp', '25', '--ta', '2300', '--dic', '2000', '--k1k2', 'lueker2000'],
        io4,
      ),
    ).toBe(2);
    expect(io4.text().stderr).toMatch(/--k1k2 is now --carbonic-constants/);
  });

  it('exit 1 with the error code when the inputs have no physical solution (DIC below CO2*)', async () => {
    const io = captureIo();
    expect(await run(['--sal', '35', '--temp', '25', '--dic', '5', '--pco2', '400'], io)).toBe(1);
    expect(io.text().stderr).toMatch(/REEFD_CARBONATE_NO_ROOT/);
  });

  it('--help prints usage and exits 0', async () => {
    const io = captureIo();
    expect(await run(['--help'], io)).toBe(0);
    expect(io.text().stdout).toMatch(/Usage: reefd carbonate --sal S --temp T/);
  });
});
