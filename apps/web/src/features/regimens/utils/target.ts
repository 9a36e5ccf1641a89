import type { Target } from '@ebbtide/contracts';

export interface ExposureLike {
  peakMgL: number | null;
  troughMgL: number | null;
  auc24: number | null;
}

/** The value of the target's metric for an exposure (peak/MIC needs the MIC; Css = AUC24 / 24). */
export function metricValue(target: Target, e: ExposureLike, micMgL: number | null): number | null {
  switch (target.metric) {
    case 'auc24':
      return e.auc24;
    case 'trough':
      return e.troughMgL;
    case 'peak':
      return e.peakMgL;
    case 'peak-mic-ratio':
      return e.peakMgL !== null && micMgL ? e.peakMgL / micMgL : null;
    case 'css':
      return e.auc24 !== null ? e.auc24 / 24 : null;
  }
}

/** Whether an exposure reaches the target: 'yes', 'below', 'above' or 'unknown'. */
export function attainment(target: Target, e: ExposureLike, micMgL: number | null) {
  const v = metricValue(target, e, micMgL);
  if (v === null) return 'unknown' as const;
  if (target.low !== null && v < target.low) return 'below' as const;
  if (target.high !== null && v > target.high) return 'above' as const;
  return 'yes' as const;
}
