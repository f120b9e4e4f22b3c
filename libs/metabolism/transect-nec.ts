// NEC and NCP_C of one transect window (docs/methods/metabolism.md 6.3-6.5): from the alkalinity anomaly
// budget where a TA gradient is measured (Smith 1973; Kinsey 1978), else from the pCO2 + O2 inverse. The
// control volume and the window's record of checks come from transect-segment.ts.

import type { AirSeaFluxes } from './air-sea.js';
import { inverseWindow, type InverseWindowResult } from './inverse-window.js';
import { hasGradientTa, ncpCFromDic, taBudget, type BudgetContext } from './nec-ta.js';
import { addReason, worst, type Segment, type WindowLog } from './transect-segment.js';
import type { FluxResult, InverseState, QcFlag } from './types.js';

export interface NecParts {
  nec: number | null;
  sigmaNec: number | null;
  necMethod: FluxResult['necMethod'];
  ncpC: number | null;
  inverseState: InverseState | null;
  necInverse: number | null;
  necFailure: FluxResult['necFailure'];
}

/** What the inverse takes from the rest of the window: input flags, the O2 budget and the exchange terms. */
export interface InverseInputs {
  pco2Present: boolean;
  pco2Flag: QcFlag;
  o2: { ncp: number | null; stO2: number; dO2: number; sigmaNcpO2Sys: number; sigmaNcpO2Rand: number };
  as: AirSeaFluxes;
  wantSigma: boolean;
  /** Run the inverse in windows whose NEC comes from the TA budget too. */
  inverseWithTa: boolean;
  previousResult: FluxResult | undefined;
}

/** NEC from the TA budget (and NCP_C from DIC) where both stations measure a TA gradient that passed QC. */
export function taNec(
  seg: Segment,
  physFlag: QcFlag,
  as: AirSeaFluxes,
  wantSigma: boolean,
  log: WindowLog,
): NecParts {
  const { up, down, params } = seg;
  const out: NecParts = {
    nec: null,
    sigmaNec: null,
    necMethod: null,
    ncpC: null,
    inverseState: null,
    necInverse: null,
    necFailure: null,
  };
  const taFlag = worst(physFlag, up.taFlag, down.taFlag);
  if (!(hasGradientTa(up) && hasGradientTa(down) && taFlag < 4)) return out;
  out.necMethod = 'ta';
  const ctx: BudgetContext = {
    rhoKgM3: seg.rho,
    depthM: seg.h,
    uMS: seg.u,
    lengthM: params.lengthM,
    s0: seg.sMean,
    dtS: seg.dtS,
    sigmaUMS: seg.sigmaU,
    sigmaDepthM: seg.sigmaH,
    sigmaLengthM: params.sigmaLengthM,
    ...(seg.pU && seg.pD ? { prevUp: seg.pU, prevDown: seg.pD } : {}),
  };
  const ta = taBudget(ctx, up, down, params.sigmaTaFromSalinityUmolKg);
  out.nec = ta.necUmolM2S;
  if (wantSigma) out.sigmaNec = ta.sigmaNecUmolM2S;
  log.flag = worst(log.flag, taFlag);
  const dicFlag = worst(physFlag, up.dicFlag, down.dicFlag);
  if (up.dicUmolKg !== undefined && down.dicUmolKg !== undefined && dicFlag < 4) {
    out.ncpC = ncpCFromDic(ctx, up, down, ta, as.fasCo2UmolM2S ?? 0);
  }
  return out;
}

function runInverse(seg: Segment, necMethod: FluxResult['necMethod'], x: InverseInputs): InverseWindowResult {
  const prevState = x.previousResult?.inverseState;
  const usePrev = seg.hasPrev && prevState !== null && prevState !== undefined;
  return inverseWindow(
    {
      up: seg.up,
      down: seg.down,
      tCentreMs: seg.current.tCentreMs,
      uMS: seg.u,
      depthM: seg.h,
      rhoKgM3: seg.rho,
      dtS: seg.dtS,
      o2StorageUmolKgS: x.o2.stO2,
      o2DiffUmolKg: x.o2.dO2,
      airSea: x.as,
      baroHpa: seg.current.baroHpa,
      previous: usePrev ? prevState : undefined,
      ...(x.wantSigma && necMethod === 'inverse'
        ? {
            sigmas: {
              uMS: seg.sigmaU,
              depthM: seg.sigmaH,
              ncpO2SysUmolM2S: x.o2.sigmaNcpO2Sys,
              ncpO2RandUmolM2S: x.o2.sigmaNcpO2Rand,
            },
          }
        : {}),
    },
    seg.params,
  );
}

/**
 * The inverse: NEC where no TA gradient is measured; in bottle windows (NEC from TA) it runs too when asked,
 * so the next window continues the storage form from this one instead of restarting from the steady form
 * (docs/methods/metabolism.md 6.5). Fills `nec` in place.
 */
export function inverseNec(seg: Segment, nec: NecParts, x: InverseInputs, log: WindowLog): void {
  const inverseApplies = x.pco2Present && x.o2.ncp !== null;
  const run = inverseApplies && (nec.necMethod === null || x.inverseWithTa);
  if (run && nec.necMethod === null) nec.necMethod = 'inverse';
  if (!run) return;
  if (x.pco2Flag >= 4) {
    if (nec.necMethod === 'inverse') addReason(log, x.pco2Flag === 9 ? 'input_missing' : 'input_qc_failed');
    return;
  }
  const inv = runInverse(seg, nec.necMethod, x);
  if (inv.ok) nec.inverseState = inv.state;
  if (nec.necMethod === 'ta') {
    // Kept beside the TA budget's NEC for comparison; the window's flag and NEC are the TA budget's.
    if (inv.ok) nec.necInverse = inv.necUmolM2S;
    return;
  }
  const { up, current } = seg;
  if (inv.steady) {
    log.notes.push('steady_form');
    log.flag = worst(log.flag, 3);
  }
  log.flag = worst(log.flag, x.pco2Flag, up.taSource === 'sample' ? undefined : up.taFlag);
  // docs/methods/metabolism.md 6.2: a configured site xCO2 instead of the met sensor's is flagged 2.
  if (current.xco2AirPpm === undefined && current.windMS !== undefined) log.flag = worst(log.flag, 2);
  if (inv.ok) {
    nec.nec = inv.necUmolM2S;
    nec.sigmaNec = inv.sigmaNecUmolM2S;
  } else {
    log.notes.push(inv.code === 'REEFD_METABOLISM_NEC_NO_ROOT' ? 'nec_no_root' : 'nec_carbonate_failed');
    nec.necFailure = { code: inv.code, reason: inv.reason };
    log.flag = worst(log.flag, 4);
  }
}
