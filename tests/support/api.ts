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
