import type { Regimen, RegimenSearchResponse } from '@ebbtide/contracts';

export type RegimenRoute = Regimen['route'];
type RegimenKind = RegimenSearchResponse['regimens'][number]['regimenKind'];

/**
 * The route a candidate is given by: oral and intramuscular candidates keep their route (never an
 * IV bolus, whatever their infusion time of 0 says); IV ones are an infusion unless they take no time.
 */
export function routeOfCandidate(kind: RegimenKind, infusionH: number): RegimenRoute {
  if (kind === 'oral') return 'oral';
  if (kind === 'intramuscular') return 'im';
  return infusionH > 0 ? 'iv-infusion' : 'iv-bolus';
}

/** Given without an infusion (oral, IM): no infusion time, no rate limit. */
export const isAbsorbed = (route: RegimenRoute): boolean => route === 'oral' || route === 'im';
