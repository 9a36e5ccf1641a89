import type { Page } from 'playwright-core';
import { inject } from 'vitest';
import { DEMO_PASSWORD } from '../../apps/idp/src/demo';

export const DEMO_LOGINS = {
  pharmacist: 'maren.okafor',
  reviewer: 'tomasz.lindqvist',
  trainee: 'priya.ferreira-hale',
  admin: 'dov.achterberg',
} as const;

/** Fills in the local identity provider's sign-in form on the current page. */
export async function fillProviderSignIn(
  page: Page,
  login: string,
  password: string = DEMO_PASSWORD,
): Promise<void> {
  await page.getByLabel('User name or e-mail').fill(login);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

/** From the start page through the provider's form to the caseload, as a user signs in. */
export async function signInToCaseload(page: Page, login: string): Promise<void> {
  await page.goto(inject('baseUrl'));
  await page.getByRole('link', { name: 'Continue to hospital sign-in' }).click();
  await fillProviderSignIn(page, login);
  await page.getByRole('heading', { name: 'Caseload' }).waitFor();
}
