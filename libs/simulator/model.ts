// The reef state at a time: forcing -> waves and flow -> water chemistry along the flow path
// (reef front -> crest -> mid flat -> back reef -> lagoon box -> channel). Stepped at a fixed interval,
// because the budget with storage (science 6.4) carries the previous step.
import {
  communityRates,
  FLAT_COMMUNITY,
  LAGOON_COMMUNITY,
  MMOL_M2_H_TO_UMOL_M2_S,
  transferVelocities,
  type Metabolism,
} from './community.js';
import {
  co2SolubilityMolKgAtm,
  density,
  o2Saturation,
  offshoreDicAt,
  speciate,
  TRACERS,
  type Water,
} from './chemistry.js';
import { forwardDownstream, forwardSteady, forwardWithStorage } from '../metabolism/index.js';
import { crossReef, depthLimitedHrmsM, type CrossReefState } from './hydro.js';
import type { Rng } from './prng.js';
import {
  clearSkyParUmolM2S,
  createClouds,
  createTide,
  sinSolarElevation,
  smoothSeries,
  solarHour,
} from './signals.js';
import { BED_ELEVATION_M, type Role, type SiteLayout } from './site.js';
import { SIMULATOR_ERRORS } from './errors.js';

const HOUR_S = 3600;
const DAY_S = 86400;
const CP_J_KG_K = 3990; // J kg-1 K-1, seawater heat capacity at 28 degC (common practice)
const LATENT_J_KG = 2.43e6; // J kg-1, latent heat of evaporation at 28 degC (common practice)
const REEF_FRONT_WIDTH_M = 1500; // m of reef front draining into the lagoon (fictional)
const LAGOON_AREA_M2 = 1.2e6; // m2 (fictional)
const CHANNEL_WIDTH_M = 110; // m (fictional)
const OFFSHORE_PCO2_UATM = 405;

export interface WaveClimateOverride {
  /** Fixes the offshore Hrms (m) and peak period (s) instead of the slowly varying climate. */
  hrmsM: number;
  tpS: number;
}

export interface ModelOptions {
  startMs: number;
  stepS: number;
  taS35UmolKg: number;
  waves?: WaveClimateOverride;
  /** Centre (ms) and peak extra oxygen demand (mmol m-2 h-1) of the lagoon's low-oxygen night. */
  /** Peak extra oxygen demand (mmol m-2 h-1) of a scheduled low-oxygen night (scheduleLagoonEvent). */
  lagoonEventDemandMmolM2H?: number;
}

export interface RoleState {
  depthM: number;
  /** Sea-swell Hrms (m), peak period (s), and infragravity Hm0 (m) at the station. */
  hrmsSsM: number;
  tpS: number;
  hm0IgM: number;
  eastMS: number;
  northMS: number;
  water: Water;
}

export interface ReefSnapshot {
  tMs: number;
  tideM: number;
  hrmsOffshoreM: number;
  tpOffshoreS: number;
  parUmolM2S: number;
  windMS: number;
  windDirDeg: number;
  baroHpa: number;
  airTempC: number;
  xco2Ppm: number;
  flow: CrossReefState;
  roles: Record<Role, RoleState>;
  /** Community rates (mmol m-2 h-1) on the two flat segments, at their mean depth. */
  outer: Metabolism;
  inner: Metabolism;
}

function copyWater(w: Water): Water {
  return { ...w };
}

export class ReefModel {
  readonly #layout: SiteLayout;
  readonly #opts: ModelOptions;
  readonly #tide;
  readonly #clouds;
  readonly #hrms;
  readonly #wind;
  readonly #windDir;
  readonly #baro;
  readonly #sst;
  readonly #sss;
  readonly #dailyP: Rng;
  readonly #dailyScale = new Map<number, number>();
  #tS = 0;
  #eventCentresMs: number[] = [];
  #prev: { crest: Water; flat: Water; back: Water; front: Water } | undefined;
  #lagoon: Water | undefined;
  #dic0 = 0;
  #s0 = 35.05;

  constructor(layout: SiteLayout, rng: Rng, opts: ModelOptions) {
    this.#layout = layout;
    this.#opts = opts;
    this.#tide = createTide(rng.fork('tide'));
    this.#clouds = createClouds(rng.fork('clouds'));
    this.#hrms = smoothSeries(rng.fork('hrms'), 1.2, 0.75, 1.5 * DAY_S, 6 * DAY_S, 3);
    this.#wind = smoothSeries(rng.fork('wind'), 6.5, 3, 6 * HOUR_S, 3 * DAY_S, 4);
    this.#windDir = smoothSeries(rng.fork('wdir'), 95, 25, 12 * HOUR_S, 4 * DAY_S, 3);
    this.#baro = smoothSeries(rng.fork('baro'), 1010.5, 3, 1 * DAY_S, 6 * DAY_S, 3);
    this.#sst = smoothSeries(rng.fork('sst'), 27.9, 0.3, 2 * DAY_S, 10 * DAY_S, 2);
    this.#sss = smoothSeries(rng.fork('sss'), 35.05, 0.05, 2 * DAY_S, 10 * DAY_S, 2);
    this.#dailyP = rng.fork('daily');
  }

  /** Offshore (fore reef) water at time tS. */
  #offshore(tS: number): Water {
    const tMs = this.#opts.startMs + tS * 1000;
    const hour = solarHour(tMs, this.#layout.lonDeg);
    const tempC = this.#sst.at(tS) + 0.15 * Math.cos((2 * Math.PI * (hour - 15)) / 24);
    const sal = this.#sss.at(tS) + 0.01 * Math.cos((2 * Math.PI * tS) / (12.42 * HOUR_S));
    const ta = (this.#opts.taS35UmolKg * sal) / 35;
    if (this.#dic0 === 0) {
      this.#s0 = sal;
      this.#dic0 = offshoreDicAt(ta, OFFSHORE_PCO2_UATM, sal, tempC);
    }
    const w: Water = { tempC, sal, o2UmolKg: 0, taUmolKg: ta, dicUmolKg: (this.#dic0 * sal) / this.#s0 };
    w.o2UmolKg = 1.01 * o2Saturation(w);
    return w;
  }

  /** Day-to-day productivity factor 0.9-1.1 (cloud history, nutrients; fictional). */
  #productivity(tMs: number): number {
    const day = Math.floor((tMs / 3.6e6 + this.#layout.lonDeg / 15) / 24);
    let s = this.#dailyScale.get(day);
    if (s === undefined) {
      s = 0.9 + 0.2 * this.#dailyP.fork(String(day)).next();
      this.#dailyScale.set(day, s);
    }
    return s;
  }

  /** Schedules a low-oxygen night in the lagoon centred at centreMs (a calm, stratified night with a decaying
   * bloom's oxygen demand). */
  scheduleLagoonEvent(centreMs: number): void {
    this.#eventCentresMs.push(centreMs);
  }

  /** Advances to step k (tS = k stepS) and returns the state. Call with consecutive k from 0. */
  step(): ReefSnapshot {
    const tS = this.#tS;
    this.#tS += this.#opts.stepS;
    const W = this.#opts.stepS;
    const tMs = this.#opts.startMs + tS * 1000;
    const L = this.#layout;
    const tide = this.#tide.levelM(tS);
    const hrms0 = this.#opts.waves?.hrmsM ?? Math.min(2.0, Math.max(0.5, this.#hrms.at(tS)));
    const tp0 = this.#opts.waves?.tpS ?? 8 + (4 * (hrms0 - 0.5)) / 1.5;
    const sinE = sinSolarElevation(tMs, L.latDeg, L.lonDeg);
    const par = clearSkyParUmolM2S(sinE) * this.#clouds.transmission(tS);
    this.#eventCentresMs = this.#eventCentresMs.filter((c) => tMs - c < 12 * 3.6e6);
    let eventShape = 0;
    for (const c of this.#eventCentresMs)
      eventShape = Math.max(eventShape, Math.exp(-0.5 * ((tMs - c) / (1.6 * 3.6e6)) ** 2));
    const eventDemand = this.#opts.lagoonEventDemandMmolM2H ?? 180;
    const hour = solarHour(tMs, L.lonDeg);
    const wind = Math.max(
      0.3,
      (this.#wind.at(tS) + 0.8 * Math.cos((2 * Math.PI * (hour - 14)) / 24)) * (1 - 0.75 * eventShape),
    );
    const still = (r: Role) => tide - BED_ELEVATION_M[r];
    const flow = crossReef({
      hrmsOffshoreM: hrms0,
      tpS: tp0,
      stillDepthForeM: still('fore'),
      stillDepthCrestM: still('crest'),
      stillDepthFlatM: still('flat'),
      stillDepthBackM: still('back'),
    });
    const setup = flow.setupFlatM;
    const depth: Record<Role, number> = {
      fore: still('fore'),
      crest: flow.depthCrestM,
      flat: flow.depthFlatM,
      back: flow.depthBackM,
      lagoon: still('lagoon') + 0.05 * setup,
      channel: still('channel'),
      mast: 0,
    };
    const off = this.#offshore(tS);
    const prod = this.#productivity(tMs);
    const windHeight = 6;

    // Source term Q = (F_b - F_as)/(rho h) per tracer for a segment of depth h with community rates m.
    const sources = (
      up: Water,
      h: number,
      m: { ncpMmolM2H: number; necMmolM2H: number },
      extraO2DemandMmolM2H = 0,
    ) => {
      const rho = density(up);
      const ncp = m.ncpMmolM2H * MMOL_M2_H_TO_UMOL_M2_S;
      const nec = m.necMmolM2H * MMOL_M2_H_TO_UMOL_M2_S;
      const demand = extraO2DemandMmolM2H * MMOL_M2_H_TO_UMOL_M2_S;
      const k = transferVelocities(wind, windHeight, up.tempC);
      const fasO2 = k.kO2MS * rho * (up.o2UmolKg - o2Saturation(up));
      const pco2 = speciate(up).pco2Uatm;
      const pco2Air = 424 * (this.#baro.at(tS) / 1013.25);
      const fasCo2 = k.kCo2MS * rho * co2SolubilityMolKgAtm(up) * (pco2 - pco2Air); // umol m-2 s-1 (K0 mol/kg/atm x uatm)
      const sw = par / 2.06; // W m-2 shortwave from PAR (about 2.06 umol J-1, common practice)
      const heat = 0.9 * sw - 190 - 25 * (wind - 6); // W m-2 net surface heat flux (fictional bulk balance)
      const evap = Math.max(0, (110 + 12 * (wind - 6) + 0.05 * sw) / LATENT_J_KG); // kg m-2 s-1
      return {
        tempC: heat / (rho * CP_J_KG_K * h),
        sal: (up.sal * evap) / (rho * h),
        o2UmolKg: (ncp - demand - fasO2) / (rho * h),
        taUmolKg: (-2 * nec) / (rho * h),
        dicUmolKg: (-ncp + demand - nec - fasCo2) / (rho * h),
      } satisfies Record<keyof Water, number>;
    };

    const baroHpa = this.#baro.at(tS);
    const station = (w: Water) => ({
      tempC: w.tempC,
      salinity: w.sal,
      o2UmolKg: w.o2UmolKg,
      taUmolKg: w.taUmolKg,
      dicUmolKg: w.dicUmolKg,
    });
    // One flat segment: heat and salt by the budget algebra of science 6.4, O2, TA and DIC (and so pCO2)
    // by libs/metabolism's forward model of the same budget, with wind-driven air-sea exchange.
    const segment = (
      up: Water,
      before: { up: Water; down: Water } | undefined,
      h: number,
      u: number,
      len: number,
      m: { ncpMmolM2H: number; necMmolM2H: number },
    ): Water => {
      const q = sources(up, h, m);
      const carry = (tr: 'tempC' | 'sal') =>
        before
          ? forwardWithStorage(up[tr], before.up[tr], before.down[tr], q[tr], u, len, W)
          : forwardSteady(up[tr], q[tr], u, len);
      const tempC = carry('tempC');
      const sal = carry('sal');
      const f = forwardDownstream({
        up: station(up),
        downTempC: tempC,
        downSalinity: sal,
        ncpMmolM2H: m.ncpMmolM2H,
        necMmolM2H: m.necMmolM2H,
        pq: 1,
        uMS: u,
        depthM: h,
        lengthM: len,
        baroHpa,
        airSea: { kind: 'wind', windMS: wind, windHeightM: windHeight, xco2AirPpm: 424 },
        ...(before ? { previous: { dtS: W, up: station(before.up), down: station(before.down) } } : {}),
      });
      if (!f.ok) throw SIMULATOR_ERRORS.error('REEFD_SIMULATOR_FORWARD', f.reason);
      return { tempC, sal, o2UmolKg: f.o2UmolKg, taUmolKg: f.taUmolKg, dicUmolKg: f.dicUmolKg };
    };

    const frontDepth = depth.crest + 1.5; // spur-and-groove front, ~1.5 m deeper than the crest (fictional)
    const frontRates = communityRates(par, frontDepth, FLAT_COMMUNITY, 0.6 * prod);
    const hOuter = 0.5 * (depth.crest + depth.flat);
    const hInner = 0.5 * (depth.flat + depth.back);
    const outer = communityRates(par, hOuter, FLAT_COMMUNITY, prod);
    const inner = communityRates(par, hInner, FLAT_COMMUNITY, prod);
    const prev = this.#prev;
    // Continuity: every segment carries the same volume flux q per metre of reef (no water enters or leaves
    // sideways), so its mean velocity is q over its mean depth. (Taking the velocity at one end of a segment
    // instead moves more or less water through it than crosses the crest.)
    // The first step has no previous window: the steady form (science 6.4).
    const crest = segment(
      off,
      prev && { up: prev.front, down: prev.crest },
      frontDepth,
      flow.qM2S / frontDepth,
      L.frontToCrestM,
      frontRates,
    );
    const flatW = segment(
      crest,
      prev && { up: prev.crest, down: prev.flat },
      hOuter,
      flow.qM2S / hOuter,
      L.crestToFlatM,
      outer,
    );
    const back = segment(
      flatW,
      prev && { up: prev.flat, down: prev.back },
      hInner,
      flow.qM2S / hInner,
      L.flatToBackM,
      inner,
    );
    this.#prev = { front: off, crest, flat: flatW, back };

    // Lagoon: a well-mixed box fed by the back-reef water, flushed through the channel.
    const hLag = depth.lagoon;
    const inflowM3S = flow.qM2S * REEF_FRONT_WIDTH_M;
    // On the event night the calm leaves the patch reef's basin stratified: its exchange with the
    // inflowing water drops to a fifth (fictional scenario for the low-oxygen alert).
    const flushPerS = (inflowM3S / (LAGOON_AREA_M2 * hLag)) * (1 - 0.8 * eventShape);
    const lag = this.#lagoon ?? copyWater(back);
    const lagRates = communityRates(par, hLag, LAGOON_COMMUNITY, prod);
    // Extra oxygen demand of the event night, limited as O2 runs out (Michaelis-Menten, K = 15 umol/kg).
    const demand = (eventDemand * eventShape * lag.o2UmolKg) / (lag.o2UmolKg + 15);
    const qLag = sources(lag, hLag, lagRates, demand);
    for (const tr of TRACERS) lag[tr] += W * ((back[tr] - lag[tr]) * flushPerS + qLag[tr]);
    this.#lagoon = lag;

    // Channel: lagoon water on the ebb (outflow), offshore water on the flood; continuity with the tidal
    // prism, V = (Q_reef - A_lagoon d(eta)/dt)/(W_ch h_ch), positive towards the sea (south).
    const hCh = depth.channel;
    const uCh = (inflowM3S - LAGOON_AREA_M2 * this.#tide.rateMS(tS)) / (CHANNEL_WIDTH_M * hCh);
    const wOut = 1 / (1 + Math.exp(-uCh / 0.03));
    const chan = copyWater(lag);
    for (const tr of TRACERS) chan[tr] = wOut * lag[tr] + (1 - wOut) * off[tr];

    const axis = (L.reefAxisDeg * Math.PI) / 180;
    const towards = (speed: number, bearingRad: number) => ({
      eastMS: speed * Math.sin(bearingRad),
      northMS: speed * Math.cos(bearingRad),
    });
    const deg = Math.PI / 180;
    const roles: Record<Role, RoleState> = {
      fore: {
        depthM: depth.fore,
        hrmsSsM: flow.hrmsForeM,
        tpS: tp0,
        hm0IgM: 0.05 * flow.hrmsForeM,
        ...towards(0.04, axis - 20 * deg),
        water: off,
      },
      crest: {
        depthM: depth.crest,
        hrmsSsM: flow.hrmsCrestM,
        tpS: tp0,
        hm0IgM: 0.15 * flow.hrmsCrestM,
        ...towards(flow.uCrestMS, axis),
        water: crest,
      },
      flat: {
        depthM: depth.flat,
        hrmsSsM: flow.hrmsFlatM,
        tpS: tp0,
        hm0IgM: 0.3 * flow.hrmsFlatM,
        ...towards(flow.uFlatMS, axis - 4 * deg),
        water: flatW,
      },
      back: {
        depthM: depth.back,
        hrmsSsM: flow.hrmsBackM,
        tpS: tp0,
        hm0IgM: 0.35 * flow.hrmsBackM,
        ...towards(flow.uBackMS, axis - 12 * deg),
        water: back,
      },
      lagoon: {
        depthM: depth.lagoon,
        hrmsSsM: depthLimitedHrmsM(0.2 * flow.hrmsBackM + 0.02 * wind, hLag, 0.4),
        tpS: 4.5,
        hm0IgM: 0.01,
        eastMS: 0,
        northMS: 0,
        water: copyWater(lag),
      },
      channel: {
        depthM: hCh,
        hrmsSsM: 0.25 * hrms0,
        tpS: tp0,
        hm0IgM: 0.03,
        ...towards(uCh, Math.PI),
        water: chan,
      },
      mast: { depthM: 0, hrmsSsM: 0, tpS: tp0, hm0IgM: 0, eastMS: 0, northMS: 0, water: off },
    };
    return {
      tMs,
      tideM: tide,
      hrmsOffshoreM: hrms0,
      tpOffshoreS: tp0,
      parUmolM2S: par,
      windMS: wind,
      windDirDeg: ((this.#windDir.at(tS) % 360) + 360) % 360,
      baroHpa: this.#baro.at(tS) + 1.1 * Math.cos((2 * Math.PI * (hour - 10)) / 12),
      airTempC: 27.2 + 1.6 * Math.cos((2 * Math.PI * (hour - 14)) / 24),
      xco2Ppm: 424 + 2 * Math.cos((2 * Math.PI * (hour - 5)) / 24),
      flow,
      roles,
      outer,
      inner,
    };
  }
}
