import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ReviewQueuePage } from '@ebbtide/contracts';
import { apiFetch, toQueryString } from '../../../lib/api-client';

/** GET /api/reviews — submitted plans, oldest first. */
export const getReviewQueue = (page = 1) =>
  apiFetch<ReviewQueuePage>(`/api/reviews${toQueryString({ page, pageSize: 50 })}`);

export const reviewQueueQueryOptions = (page = 1) =>
  queryOptions({
    queryKey: ['reviews', 'list', { page }],
    queryFn: () => getReviewQueue(page),
    refetchInterval: 60_000,
  });

export const useReviewQueue = (page = 1) => useQuery(reviewQueueQueryOptions(page));
