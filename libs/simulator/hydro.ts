// Wave transformation and wave-driven flow over the fictional reef.
// Dispersion: omega^2 = g k tanh(kh), Newton from the Guo (2002, Coastal Eng. 47, 97-103) guess (science 4.3).
// Shoaling: energy-flux conservation, Ks = sqrt(cg0/cg) (linear theory; Dean & Dalrymple 1991, ch. 4).
// Breaking: depth-limited Hrms = gamma h (Thornton & Guza 1983, J. Geophys. Res. 88, 5925: gamma ~ 0.42 for
// Hrms; reef flats 0.35-0.55, common practice), blended with a smooth minimum so the model has no kinks.
// Setup and flow: radiation-stress drop across the breaking zone, Sxx = (3/16) rho g Hrms^2 in shallow water
// (Longuet-Higgins & Stewart 1964, Deep-Sea Res. 11, 529), balanced by the setup gradient; the setup then
// drives flow across the flat against quadratic bottom friction, g dEta/dx = Cd U^2/h, with the lagoon open to
// the sea through the channel (the reef-lagoon circulation model of Symonds, Black & Young 1995, J. Geophys.
// Res. 100, 2639, in its simplest steady, one-dimensional form).

export const G = 9.80665; // m s-2, standard gravity

/** Wavenumber k (rad/m) for frequency fHz in depth hM; Newton to |dk|/k < 1e-12 (at most 10 steps).
 * Check: T = 10 s in h = 10 m gives L = 92.3 m (Dean & Dalrymple 1991, table C-1, common practice). */
export function wavenumber(fHz: number, hM: number): number {
  const omega = 2 * Math.PI * fHz;
  const x = omega * Math.sqrt(hM / G);
  let k = (x * x * (1 - Math.exp(-(x ** 2.5))) ** -0.4) / hM;
  for (let i = 0; i < 10; i++) {
    const th = Math.tanh(k * hM);
    const f = omega * omega - G * k * th;
    const df = -G * (th + k * hM * (1 - th * th));
    const dk = -f / df;
    k += dk;
    if (Math.abs(dk) / k < 1e-12) break;
  }
  return k;
}

/** Group velocity, m/s. */
export function groupVelocityMS(fHz: number, hM: number): number {
  const k = wavenumber(fHz, hM);
  const kh = k * hM;
  const c = (2 * Math.PI * fHz) / k;
  return 0.5 * c * (1 + (2 * kh) / Math.sinh(2 * kh));
}

/** Shoaling coefficient from deep water to depth hM at period tpS (Ks -> 1 in deep water, ~0.91 minimum). */
export function shoalingCoefficient(tpS: number, hM: number): number {
  const cg0 = (G * tpS) / (4 * Math.PI);
  return Math.sqrt(cg0 / groupVelocityMS(1 / tpS, hM));
}

/** Smooth minimum of a wave height and its depth-limited cap gamma*h: (H^-p + Hcap^-p)^(-1/p), p = 10
 * (within 7 % of the hard minimum where the two meet, exact away from it). */
export function depthLimitedHrmsM(incidentHrmsM: number, depthM: number, gamma: number): number {
  const cap = Math.max(gamma * depthM, 1e-6);
  if (incidentHrmsM <= 0) return 0;
  return (incidentHrmsM ** -10 + cap ** -10) ** -0.1;
}

/** Parameters of the reef's cross-shore hydraulics (all fictional values for Ornen Reef). */
export interface ReefHydraulics {
  /** Hrms/h on the crest, the flat and the back reef. */
  gammaCrest: number;
  gammaFlat: number;
  gammaBack: number;
  /** Bottom drag coefficient of the flat's depth-averaged flow (rough reef flats: 0.02-0.2, common practice). */
  dragCoefficient: number;
  /** Distance over which the setup falls from the flat to the lagoon, m. */
  setupFallLengthM: number;
  /** Open fraction of the crest's cross-section (spur-and-groove: the grooves carry the flow). */
  crestOpenFraction: number;
  /** Share of the flat's setup that drives flow over the flat; the rest holds the lagoon level up against
   * the channel's head loss (the two resistances in series of the reef-lagoon circuit). */
  driveFraction: number;
  /** Share of the wave mass flux that is not returned under the troughs (0 closed beach, 1 open). */
  stokesOpenFraction: number;
}

export const ORNEN_HYDRAULICS: Readonly<ReefHydraulics> = Object.freeze({
  gammaCrest: 0.7,
  gammaFlat: 0.45,
  gammaBack: 0.4,
  dragCoefficient: 0.25,
  setupFallLengthM: 600,
  crestOpenFraction: 0.7,
  driveFraction: 0.3,
  stokesOpenFraction: 0.25,
});

/** Envelope of depth-averaged currents on reef flats and crests (common practice), m/s. */
export const FLAT_CURRENT_RANGE_M_S = [0.01, 0.26] as const;
export const CREST_CURRENT_RANGE_M_S = [0.1, 0.5] as const;

/** Soft bound: lo + (hi - lo) tanh(u/(hi - lo)); monotonic, equal to lo + u for small u, never above hi. */
export function softBound(uMS: number, range: readonly [number, number]): number {
  const [lo, hi] = range;
  return lo + (hi - lo) * Math.tanh(Math.max(0, uMS) / (hi - lo));
}

/** Shares of the flat's setup at the crest and on the back reef (setup rises through the breaking zone
 * and falls towards the lagoon). */
export const CREST_SETUP_SHARE = 0.5;
export const BACK_SETUP_SHARE = 0.6;

export interface CrossReefState {
  hrmsForeM: number;
  hrmsCrestM: number;
  hrmsFlatM: number;
  hrmsBackM: number;
  /** Setup on the flat (m above the still-water level); the crest and back reef carry shares of it. */
  setupFlatM: number;
  /** The setup these waves would make (equal to setupFlatM at the fixed point, to < 1e-4 m). */
  nextSetupM: number;
  /** Mean water depths with the setup, m. */
  depthCrestM: number;
  depthFlatM: number;
  depthBackM: number;
  /** Depth-averaged cross-reef velocity on the flat and at the crest, m/s (shoreward positive). */
  uFlatMS: number;
  uCrestMS: number;
  uBackMS: number;
  /** Volume flux per metre of reef front, m2/s. */
  qM2S: number;
}

export interface CrossReefInput {
  hrmsOffshoreM: number;
  tpS: number;
  /** Still-water depths (tide included, setup excluded) at each station, m. */
  stillDepthForeM: number;
  stillDepthCrestM: number;
  stillDepthFlatM: number;
  stillDepthBackM: number;
}

/**
 * Steady cross-reef balance. The setup and the flow depend on each other only weakly through the flat
 * depth, so two fixed-point passes suffice (the second changes U by < 1 %).
 */
export function crossReef(
  input: CrossReefInput,
  p: Readonly<ReefHydraulics> = ORNEN_HYDRAULICS,
): CrossReefState {
  const hrmsFore = input.hrmsOffshoreM * shoalingCoefficient(input.tpS, input.stillDepthForeM);
  const ksFore = shoalingCoefficient(input.tpS, input.stillDepthForeM);
  const evaluate = (setup: number): CrossReefState => {
    const hCrest = Math.max(input.stillDepthCrestM + CREST_SETUP_SHARE * setup, 0.05);
    const hFlat = Math.max(input.stillDepthFlatM + setup, 0.05);
    const hBack = Math.max(input.stillDepthBackM + BACK_SETUP_SHARE * setup, 0.05);
    const incidentCrest = hrmsFore * (shoalingCoefficient(input.tpS, hCrest) / ksFore);
    const hrmsCrest = depthLimitedHrmsM(incidentCrest, hCrest, p.gammaCrest);
    const hrmsFlat = depthLimitedHrmsM(hrmsCrest, hFlat, p.gammaFlat);
    const hrmsBack = depthLimitedHrmsM(0.92 * hrmsFlat, hBack, p.gammaBack);
    // Breaking starts where the shoaling wave reaches gamma h; the setup gradient acts over the mean depth
    // between that point and the flat.
    const hBreak = Math.max(hrmsFore / p.gammaCrest, hFlat);
    const hMean = 0.5 * (hBreak + hFlat);
    const nextSetup = Math.max(0, ((3 / 16) * (hrmsFore ** 2 - hrmsFlat ** 2)) / hMean);
    // Setup-driven flow plus the onshore wave mass flux g m0/c of the unbroken waves (Phillips 1977,
    // shallow water c = sqrt(g h), m0 = Hrms^2/8), which keeps water moving over the flat when the crest
    // is too deep for breaking. The trade's envelope of flat currents is then imposed as a soft bound,
    // standing in for what this 1-D balance leaves out (drag rising with flow, wind and tidal flow at rest).
    const uSetup = Math.sqrt(
      (G * hFlat * p.driveFraction * setup) / (p.dragCoefficient * p.setupFallLengthM),
    );
    const uStokes = (p.stokesOpenFraction * G * (hrmsFlat ** 2 / 8)) / (Math.sqrt(G * hFlat) * hFlat);
    const uFlat = softBound(uSetup + uStokes, FLAT_CURRENT_RANGE_M_S);
    const q = uFlat * hFlat;
    return {
      hrmsForeM: hrmsFore,
      hrmsCrestM: hrmsCrest,
      hrmsFlatM: hrmsFlat,
      hrmsBackM: hrmsBack,
      setupFlatM: setup,
      nextSetupM: nextSetup,
      depthCrestM: hCrest,
      depthFlatM: hFlat,
      depthBackM: hBack,
      uFlatMS: uFlat,
      uCrestMS: softBound(q / (hCrest * p.crestOpenFraction), CREST_CURRENT_RANGE_M_S),
      uBackMS: q / hBack,
      qM2S: q,
    };
  };
  // The setup changes the depths that limit the waves that make the setup: a fixed point, reached to
  // < 1 mm in a few passes (the setup is a few cm to dm).
  let setup = 0;
  for (let pass = 0; pass < 6; pass++) {
    const next = evaluate(setup).nextSetupM;
    if (Math.abs(next - setup) < 1e-4) {
      setup = next;
      break;
    }
    setup = next;
  }
  return evaluate(setup);
}
