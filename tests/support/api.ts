import { randomBytes } from 'node:crypto';
import type { APIRequestContext } from 'playwright-core';
import { inject } from 'vitest';

/**
 * Calls the API with the signed-in browser context's cookies, as the app itself would (same
 * Origin, so the CSRF check passes); fails the test with the server's answer on any non-2xx.
 * Journeys use it to create their own rows before clicking through the screens.
 */
export async function api<T>(
  request: APIRequestContext,
  method: 'get' | 'post',
  url: string,
  data?: unknown,
): Promise<T> {
  const res = await request[method](`${inject('baseUrl')}${url}`, {
    headers: { Origin: inject('baseUrl') },
    ...(data === undefined ? {} : { data }),
  });
  if (!res.ok())
    throw new Error(`${method.toUpperCase()} ${url}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

/**
 * A real (identifiable, invented) patient of the journey's own, with a fresh MRN and a family name
 * made unique by a suffix, so runs never collide. Returns its id and the family name used.
 */
export async function createJourneyPatient(
  request: APIRequestContext,
  fields: {
    givenName: string;
    familyName: string;
    sex: 'female' | 'male';
    birthDate: string;
    ward?: string;
  },
): Promise<{ id: string; familyName: string }> {
  const familyName = `${fields.familyName}-${randomBytes(3).toString('hex')}`;
  const patient = await api<{ id: string }>(request, 'post', '/api/patients', {
    isTeaching: false,
    mrn: `KB-${randomBytes(4).toString('hex')}`,
    ...fields,
    familyName,
  });
  return { id: patient.id, familyName };
}
