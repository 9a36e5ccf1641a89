import { describe, expect, it } from 'vitest';
import { loadConfig } from '../src/config';
import {
  planCountersignedMail,
  planReturnedMail,
  planSubmittedMail,
  recheckOverdueMail,
  type PlanMailContext,
  type RenderedMail,
} from '../src/mail/templates';

// An invented patient: the mapper holds all of this, and the templates must show only what
// the policy allows.
const patient = {
  name: 'Isla Jane Meriwether',
  surname: 'MERIWETHER',
  mrn: 'KB-0042917',
  dateOfBirth: '1959-04-18',
};
const ctx: PlanMailContext = {
  planUrl: 'http://127.0.0.1:4610/plans/PLN-7Q4K2',
  planVersion: 2,
  ward: '4 North',
  patientInitials: 'I.M.',
  actorName: 'Priya Halvorsen',
};
const all = (m: RenderedMail) => `${m.subject}\n${m.text}\n${m.html}`;

function expectNoIdentifiers(m: RenderedMail) {
  const body = all(m);
  expect(body).not.toContain(patient.surname);
  expect(body).not.toMatch(/Meriwether|Isla/i);
  expect(body).not.toContain(patient.mrn);
  expect(body).not.toContain(patient.dateOfBirth);
  expect(body).not.toMatch(/\d\s?(mg|mg\/L|g)\b/); // no dosing numbers
}

describe('mail templates', () => {
  it('when the policy is the default, then it is "ward": the link and the ward, no initials', () => {
    // Arrange
    const policy = loadConfig({}).mailPatientDetail;

    // Act
    const mails = [
      planSubmittedMail(ctx, policy),
      planReturnedMail({ ...ctx, comment: 'Please recheck the weight date.' }, policy),
      planCountersignedMail(ctx, policy),
      recheckOverdueMail(
        {
          ...ctx,
          recheckDueAt: new Date('2026-12-05T09:00:00+10:00'),
          timeZone: 'Australia/Brisbane',
        },
        policy,
      ),
    ];

    // Assert
    expect(policy).toBe('ward');
    for (const m of mails) {
      expectNoIdentifiers(m);
      expect(m.text).toContain(ctx.planUrl);
      expect(m.html).toContain(`href="${ctx.planUrl}"`);
      expect(m.text).toContain('Ward: 4 North');
      expect(all(m)).not.toContain('I.M.');
    }
  });

  it('when the plan is submitted, then the reviewers are told who submitted it and where to review', () => {
    const m = planSubmittedMail(ctx, 'ward');
    expect(m.subject).toBe('Dosing plan awaiting countersignature (4 North)');
    expect(m.text).toContain('Priya Halvorsen submitted a dosing plan for review.');
    expect(m.text).toContain('Plan version: 2');
  });

  it('when the plan is returned, then the author gets the reviewer comment (not under "minimal")', () => {
    const comment = 'Weight is 5 days old;\nplease confirm.';
    const ward = planReturnedMail({ ...ctx, actorName: 'Tomasz Adeyemi-Clarke', comment }, 'ward');
    expect(ward.text).toContain('> Weight is 5 days old;\n> please confirm.');
    expect(ward.html).toContain('Weight is 5 days old;<br>please confirm.');
    const minimal = planReturnedMail({ ...ctx, comment }, 'minimal');
    expect(all(minimal)).not.toContain('Weight is 5 days old');
    expect(minimal.text).toContain("Open the plan to read the reviewer's comment.");
  });

  it('when the policy is "minimal", then only the link is shown, not the ward', () => {
    const m = planCountersignedMail(ctx, 'minimal');
    expect(m.subject).toBe('Dosing plan countersigned');
    expect(all(m)).not.toContain('4 North');
    expect(m.text).toContain(ctx.planUrl);
    expectNoIdentifiers(m);
  });

  it('when the policy is "initials", then the initials and ward are shown but never the name', () => {
    const m = planSubmittedMail(ctx, 'initials');
    expect(m.text).toContain('Patient I.M., 4 North');
    expectNoIdentifiers(m);
  });

  it('when the re-check is overdue, then the due time prints in the hospital zone', () => {
    const m = recheckOverdueMail(
      { ...ctx, recheckDueAt: new Date('2026-12-04T23:00:00Z'), timeZone: 'Australia/Brisbane' },
      'ward',
    );
    expect(m.subject).toBe('Dosing plan past its re-check time (4 North)');
    expect(m.text).toContain('Re-check was due: 5 Dec 2026, 09:00 UTC+10');
  });

  it('when a field carries markup, then the HTML body escapes it', () => {
    const m = planReturnedMail(
      { ...ctx, ward: '<b>4 North</b>', comment: '<script>x</script>' },
      'ward',
    );
    expect(m.html).not.toContain('<script>');
    expect(m.html).toContain('&lt;script&gt;');
  });

  it('when MAIL_PATIENT_DETAIL is not a known policy, then the configuration is refused', () => {
    expect(() => loadConfig({ MAIL_PATIENT_DETAIL: 'full' })).toThrow(/MAIL_PATIENT_DETAIL/);
  });
});
