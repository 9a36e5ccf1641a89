import type { OdeSystem } from '../integrator/rk4';
import type { ResolvedModel } from './parameters';

/** State layout shared by every model: amounts in mg, AUC in mg·h/L. */
export const STATE_DEPOT = 0;
export const STATE_CENTRAL = 1;
export const STATE_PERIPHERAL = 2;
export const STATE_AUC = 3;
export const STATE_SIZE = 4;

/** A model right-hand side whose infusion input rate (mg/h) the integrator sets between events. */
export interface PkSystem extends OdeSystem {
  /** Current zero-order input into the central compartment, mg/h. */
  rate: number;
}

/**
 * Build the specialised right-hand side for a resolved model (one closure per structure, no branching per call).
 * Equations (Gibaldi M, Perrier D. Pharmacokinetics, 2nd ed., 1982, ch. 1–2; Michaelis-Menten elimination:
 * Winter ME, Basic Clinical Pharmacokinetics, phenytoin chapter — from memory), with C = A1/V1:
 *   dAd/dt  = −ka·Ad
 *   dA1/dt  = ka·Ad + R − E(A1) − k12·A1 + k21·A2,  E = k10·A1 (linear) or Vmax·C/(Km + C) (Michaelis-Menten)
 *   dA2/dt  = k12·A1 − k21·A2                        (two compartments only)
 *   dAUC/dt = C                                      (AUC integrated as a state)
 */
export function createSystem(m: ResolvedModel): PkSystem {
  const { ka, k10, k12, k21, vmax, km } = m;
  const invV1 = 1 / m.V1;
  if (!m.michaelisMenten && m.compartments === 1) {
    const sys: PkSystem = {
      dimension: STATE_SIZE,
      rate: 0,
      derivative(y, dy) {
        const ad = y[0] as number;
        const a1 = y[1] as number;
        const abs = ka * ad;
        dy[0] = -abs;
        dy[1] = abs + sys.rate - k10 * a1;
        dy[2] = 0;
        dy[3] = a1 * invV1;
      },
    };
    return sys;
  }
  if (!m.michaelisMenten) {
    const k1out = k10 + k12;
    const sys: PkSystem = {
      dimension: STATE_SIZE,
      rate: 0,
      derivative(y, dy) {
        const ad = y[0] as number;
        const a1 = y[1] as number;
        const a2 = y[2] as number;
        const abs = ka * ad;
        dy[0] = -abs;
        dy[1] = abs + sys.rate - k1out * a1 + k21 * a2;
        dy[2] = k12 * a1 - k21 * a2;
        dy[3] = a1 * invV1;
      },
    };
    return sys;
  }
  const sys: PkSystem = {
    dimension: STATE_SIZE,
    rate: 0,
    derivative(y, dy) {
      const ad = y[0] as number;
      const a1 = y[1] as number;
      const a2 = y[2] as number;
      const c = a1 * invV1;
      const abs = ka * ad;
      dy[0] = -abs;
      dy[1] = abs + sys.rate - (vmax * c) / (km + c) - k12 * a1 + k21 * a2;
      dy[2] = k12 * a1 - k21 * a2;
      dy[3] = c;
    },
  };
  return sys;
}
