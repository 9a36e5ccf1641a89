import { describe, expect, it } from 'vitest';
import { isAbsorbed, routeOfCandidate } from './route';

describe('routeOfCandidate', () => {
  it('keeps oral and intramuscular candidates off the IV routes', () => {
    expect(routeOfCandidate('oral', 0)).toBe('oral');
    expect(routeOfCandidate('intramuscular', 0)).toBe('im');
    expect(isAbsorbed('oral')).toBe(true);
    expect(isAbsorbed('iv-bolus')).toBe(false);
  });

  it('reads IV candidates by their infusion time', () => {
    expect(routeOfCandidate('intermittent-infusion', 1.5)).toBe('iv-infusion');
    expect(routeOfCandidate('continuous-infusion', 24)).toBe('iv-infusion');
    expect(routeOfCandidate('intermittent-infusion', 0)).toBe('iv-bolus');
  });
});
