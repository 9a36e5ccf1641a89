import type { ReviewQueuePage, ReviewQueueQuery } from '@ebbtide/contracts';
import type { Conn } from '../../data-access/casework-db';
import { submittedPlans } from '../../data-access/plans-repo';
import type { CaseworkActor } from '../patients/common';

/** The reviewers' queue: submitted plans, oldest first by default, with the waiting time. */
export async function reviewQueue(
  db: Conn,
  actor: CaseworkActor,
  query: ReviewQueueQuery,
  now = new Date(),
): Promise<ReviewQueuePage> {
  const { rows, total } = await submittedPlans(db, actor, query);
  return {
    page: query.page,
    pageSize: query.pageSize,
    total,
    items: rows.map((r) => ({
      planId: r.planId,
      courseId: r.courseId,
      planNumber: r.planNumber,
      drug: r.drug,
      ward: r.ward,
      patientName: `${(r.familyName ?? '').toUpperCase()}, ${r.givenName ?? ''}`,
      authorName: r.authorName,
      authorUserId: r.authorUserId,
      submittedAt: r.submittedAt,
      waitingMinutes: Math.max(0, Math.floor((now.getTime() - Date.parse(r.submittedAt)) / 60_000)),
      mayReview: actor.role === 'reviewer' && r.authorUserId !== actor.userId,
    })),
  };
}
