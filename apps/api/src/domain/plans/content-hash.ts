import { createHash } from 'node:crypto';

/**
 * Canonical JSON: object keys sorted at every level, no whitespace, `undefined` members dropped,
 * non-finite numbers refused. Two objects with the same content always give the same string.
 */
export function canonicalJson(value: unknown): string {
  if (value === null) return 'null';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new TypeError('canonicalJson: non-finite number');
    return JSON.stringify(value);
  }
  if (typeof value === 'string' || typeof value === 'boolean') return JSON.stringify(value);
  if (Array.isArray(value)) {
    return `[${value.map((v) => (v === undefined ? 'null' : canonicalJson(v))).join(',')}]`;
  }
  if (typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  throw new TypeError(`canonicalJson: cannot encode a ${typeof value}`);
}

/**
 * SHA-256 (hex) over the canonical JSON of a plan's content. The content names the plan, its
 * course and patient, so a signature's hash cannot be carried over to another record (11.70).
 */
export function contentHash(content: unknown): string {
  return createHash('sha256').update(canonicalJson(content), 'utf8').digest('hex');
}
