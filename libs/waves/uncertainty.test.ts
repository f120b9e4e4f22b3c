import { describe, expect, it } from 'vitest';
import { depthSigmaM } from './uncertainty.js';

describe('depthSigmaM (docs/methods/uncertainty.md 9.2)', () => {
  it('1 hPa barometer + 1 cm pressure + 1 cm survey: 0.017261 m (algebra)', () => {
    const s = depthSigmaM({ sigmaPDbar: 0.01, sigmaPatmDbar: 0.01, sigmaSensorHeightM: 0.01, rhoKgM3: 1025 });
    expect(s).toBeCloseTo(0.017261, 6);
  });
  it('a 1 hPa barometer error alone is about 1 cm of depth (docs/methods/seawater.md 2.2)', () => {
    const s = depthSigmaM({ sigmaPDbar: 0, sigmaPatmDbar: 0.01, sigmaSensorHeightM: 0, rhoKgM3: 1023 });
    expect(s).toBeGreaterThan(0.0099);
    expect(s).toBeLessThan(0.01);
  });
});
