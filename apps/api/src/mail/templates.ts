/**
 * The e-mails of the plan lifecycle. Every message carries a link to the plan in the signed-in
 * app and as little patient information as the hospital's policy allows (MAIL_PATIENT_DETAIL):
 *
 * | policy     | shows                                                        |
 * | ---------- | ------------------------------------------------------------ |
 * | `minimal`  | the link only (no ward, no initials, no reviewer comment)    |
 * | `ward`     | the link and the ward (default)                              |
 * | `initials` | the link, the ward and the patient's initials                |
 *
 * Never in any message: the patient's name, MRN, date of birth, or any dose or level. The
 * returned-plan mail quotes the reviewer's comment (except under `minimal`); reviewers are told
 * on the return form that it is mailed.
 */

export const MAIL_PATIENT_DETAIL_POLICIES = ['minimal', 'ward', 'initials'] as const;
export type MailPatientDetail = (typeof MAIL_PATIENT_DETAIL_POLICIES)[number];

/** What every plan message may draw on; the policy decides which parts are shown. */
export interface PlanMailContext {
  /** Absolute URL of the plan screen, e.g. `${PUBLIC_URL}/plans/<id>`. */
  planUrl: string;
  planVersion: number;
  /** Ward or unit, e.g. "4 North"; shown under `ward` and `initials`. */
  ward?: string | null;
  /** e.g. "J.T."; shown only under `initials`. Pass initials, never the name. */
  patientInitials?: string | null;
  /** The pharmacist who acted (submitted, returned or countersigned). Staff, not patient. */
  actorName: string;
  /** Shown in the sign-off line; defaults to "Ebbtide". */
  productName?: string;
}

export interface RenderedMail {
  subject: string;
  text: string;
  html: string;
}

const escapeHtml = (s: string): string =>
  s.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c,
  );

function patientLine(ctx: PlanMailContext, policy: MailPatientDetail): string | null {
  if (policy === 'minimal') return null;
  const ward = ctx.ward?.trim() || 'ward not recorded';
  if (policy === 'initials' && ctx.patientInitials?.trim())
    return `Patient ${ctx.patientInitials.trim()}, ${ward}`;
  return `Ward: ${ward}`;
}

function subjectSuffix(ctx: PlanMailContext, policy: MailPatientDetail): string {
  return policy !== 'minimal' && ctx.ward?.trim() ? ` (${ctx.ward.trim()})` : '';
}

interface Parts {
  subject: string;
  lead: string;
  quote?: { label: string; body: string } | undefined;
  extra?: string | undefined;
  action: string;
}

function build(ctx: PlanMailContext, policy: MailPatientDetail, parts: Parts): RenderedMail {
  const product = ctx.productName ?? 'Ebbtide';
  const patient = patientLine(ctx, policy);
  const lines = [
    parts.lead,
    '',
    ...(patient ? [patient] : []),
    `Plan version: ${ctx.planVersion}`,
    ...(parts.extra ? [parts.extra] : []),
    '',
    ...(parts.quote
      ? [`${parts.quote.label}:`, ...parts.quote.body.split(/\r?\n/).map((l) => `> ${l}`), '']
      : []),
    `${parts.action}:`,
    ctx.planUrl,
    '',
    'Patient details, doses and levels are shown only after you sign in.',
    `-- ${product}`,
  ];
  const html = `<!doctype html>
<html lang="en"><body style="font-family: 'Noto Sans', Arial, sans-serif; color: #1c2430; line-height: 1.45;">
<p>${escapeHtml(parts.lead)}</p>
<p>${patient ? `${escapeHtml(patient)}<br>` : ''}Plan version: ${ctx.planVersion}${
    parts.extra ? `<br>${escapeHtml(parts.extra)}` : ''
  }</p>
${
  parts.quote
    ? `<p>${escapeHtml(parts.quote.label)}:</p><blockquote style="border-left: 3px solid #9aa3af; margin: 0 0 1em; padding-left: 0.8em;">${escapeHtml(
        parts.quote.body,
      ).replace(/\r?\n/g, '<br>')}</blockquote>`
    : ''
}
<p><a href="${escapeHtml(ctx.planUrl)}">${escapeHtml(parts.action)}</a></p>
<p style="color: #5a6473; font-size: 0.9em;">Patient details, doses and levels are shown only after you sign in.<br>&mdash; ${escapeHtml(product)}</p>
</body></html>`;
  return { subject: parts.subject + subjectSuffix(ctx, policy), text: lines.join('\n'), html };
}

/** To the reviewers: a plan was submitted and awaits countersignature. */
export function planSubmittedMail(ctx: PlanMailContext, policy: MailPatientDetail): RenderedMail {
  return build(ctx, policy, {
    subject: 'Dosing plan awaiting countersignature',
    lead: `${ctx.actorName} submitted a dosing plan for review.`,
    action: 'Review the plan',
  });
}

/** To the author: the reviewer returned the plan, with their comment. */
export function planReturnedMail(
  ctx: PlanMailContext & { comment: string },
  policy: MailPatientDetail,
): RenderedMail {
  return build(ctx, policy, {
    subject: 'Dosing plan returned',
    lead: `${ctx.actorName} returned your dosing plan.`,
    quote:
      policy === 'minimal' || !ctx.comment.trim()
        ? undefined
        : { label: "Reviewer's comment", body: ctx.comment.trim() },
    extra: policy === 'minimal' ? "Open the plan to read the reviewer's comment." : undefined,
    action: 'Open the plan',
  });
}

/** To the author: the plan was countersigned. */
export function planCountersignedMail(
  ctx: PlanMailContext,
  policy: MailPatientDetail,
): RenderedMail {
  return build(ctx, policy, {
    subject: 'Dosing plan countersigned',
    lead: `${ctx.actorName} countersigned your dosing plan.`,
    action: 'Open the plan',
  });
}

/**
 * To the author, once per plan version: the plan's re-check time has passed. Use the
 * idempotency key `plan:<id>:recheck-overdue:v<version>` so it is sent only once.
 */
export function recheckOverdueMail(
  ctx: Omit<PlanMailContext, 'actorName'> & { recheckDueAt: Date; timeZone: string },
  policy: MailPatientDetail,
): RenderedMail {
  const due = new Intl.DateTimeFormat('en-GB', {
    timeZone: ctx.timeZone,
    day: 'numeric',
    month: 'short',
    year: 'numeric',
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
    timeZoneName: 'short',
  })
    .format(ctx.recheckDueAt)
    .replace('GMT', 'UTC');
  return build({ ...ctx, actorName: '' }, policy, {
    subject: 'Dosing plan past its re-check time',
    lead: 'A dosing plan you wrote is past its re-check time.',
    extra: `Re-check was due: ${due}`,
    action: 'Review the plan',
  });
}
